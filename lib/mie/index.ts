export { mieTermCount } from "./termCount.js";
export { mieCoefficients, mieCoefficientsPerfectConductor } from "./coefficients.js";
export { mieEfficiencies } from "./efficiencies.js";
export { mieAmplitudes } from "./amplitudes.js";
export { mieScatter, type MieScatterResult } from "./scatter.js";
export type { MieCoefficients, MieAmplitudes, MieEfficiencies } from "./types.js";
export {
  debyeCoefficients,
  debyeRemainderCoefficients,
  debyeSurfaceCoefficients,
  debyeOrderFromSurface,
  debyeRemainderFromSurface,
  type DebyeSurfaceCoefficients,
  type DebyeModeCoefficients,
} from "./debye.js";
