export * from "./observers.js";
export * from "./tristimulus.js";
export * from "./matrix3.js";
export * from "./output-spaces.js";
export * from "./adaptation.js";
export * from "./gamut.js";
export * from "./render.js";
export * from "./delta-e.js";
