export * from "./grid.js";
export * from "./spectrum.js";
