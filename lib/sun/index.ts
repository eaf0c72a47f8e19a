export * from "./physical-constants.js";
export * from "./blackbody.js";
export * from "./daylight.js";
export * from "./astm-g173.js";
export * from "./atmosphere.js";
export * from "./sources.js";
export * from "./disc.js";
