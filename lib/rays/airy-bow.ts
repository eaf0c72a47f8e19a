// Airy's theory of the rainbow of order k (Airy 1838; van de Hulst 1957 §13.21 (from memory); Wang & van de Hulst 1991,
// Appl. Opt. 30, 106): a cubic wavefront gives |S|² = C·Ai²(−ξ), ξ = s·(Θ − Θ_R)·(2/D″)^(1/3)·x^(2/3),
// with s = dΘ/dD so that ξ > 0 on the lit side. C follows from matching the local mean of Ai²(−ξ),
// 1/(2π√ξ) (A&S 10.4.60), to the two-ray geometric sum 2·x²·ε²·b_R/(sinΘ_R·√(2D″Δ)):
// C = 4π·2^(−1/3)·x^(7/3)·ε²·b_R / (D″^(2/3)·sinΘ_R), with ε² the Fresnel path factor of the rainbow ray.

import { airyAi } from "../special/airy.js";
import { deviationCurvature, deviationRad, rainbowImpactParameter, scatteringAngleOfDeviation } from "./descartes.js";
import { pathTransmittance } from "./fresnel.js";
import type { PolarisedIntensity } from "./geometric-intensity.js";

const DEG = Math.PI / 180;

export interface AiryBowScale {
  /** Geometric rainbow scattering angle Θ_R, degrees. */
  rainbowAngleDeg: number;
  /** ξ per radian of scattering angle, signed so that ξ > 0 on the lit side. */
  xiPerRad: number;
  /** C_j of |S_j|² = C_j·Ai²(−ξ). */
  perpendicularScale: number;
  parallelScale: number;
}

/** The constants of the Airy bow of order k ≥ 1 for real index n and size parameter x. */
export function airyBowScale(n: number, x: number, k: number): AiryBowScale {
  const b = rainbowImpactParameter(n, k);
  if (b === null || k < 1) throw new RangeError(`no rainbow for n = ${n}, k = ${k}`);
  const curvature = deviationCurvature(n, k, b);
  const { angle, sign } = scatteringAngleOfDeviation(deviationRad(n, k, b));
  const common = (4 * Math.PI * 2 ** (-1 / 3) * x ** (7 / 3) * b) / (curvature ** (2 / 3) * Math.sin(angle));
  const energy = pathTransmittance(n, k, b);
  return {
    rainbowAngleDeg: angle / DEG,
    xiPerRad: sign * Math.cbrt(2 / curvature) * x ** (2 / 3),
    perpendicularScale: common * energy.perpendicular,
    parallelScale: common * energy.parallel,
  };
}

/** Airy-theory |S1|², |S2|² near the bow of order k at each scattering angle (degrees). */
export function airyBowIntensity(n: number, x: number, k: number, scatteringAngleDeg: Float64Array): PolarisedIntensity {
  const scale = airyBowScale(n, x, k);
  const perpendicular = new Float64Array(scatteringAngleDeg.length);
  const parallel = new Float64Array(scatteringAngleDeg.length);
  for (let j = 0; j < scatteringAngleDeg.length; j++) {
    const xi = scale.xiPerRad * (scatteringAngleDeg[j] - scale.rainbowAngleDeg) * DEG;
    const ai = airyAi(-xi);
    perpendicular[j] = scale.perpendicularScale * ai * ai;
    parallel[j] = scale.parallelScale * ai * ai;
  }
  return { perpendicular, parallel };
}
