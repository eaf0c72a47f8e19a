export * from "./gamma-function.js";
export * from "./distributions.js";
export * from "./moments.js";
export * from "./quadrature.js";
