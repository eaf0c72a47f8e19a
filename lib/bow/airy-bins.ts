// Airy theory of a bow, averaged over angle bins exactly: ∫Ai²(z)dz = z·Ai²(z) − Ai′²(z) (Abramowitz & Stegun
// 1964 Eq. 10.4.1 gives Ai″ = z·Ai, which makes this the antiderivative), so fringes finer than a bin never alias.

import { airyPair } from "../special/airy.js";
import { airyBowScale } from "../rays/airy-bow.js";

const DEG = Math.PI / 180;

function airySquaredIntegral(z: number): number {
  const { ai, aiPrime } = airyPair(z);
  return z * ai * ai - aiPrime * aiPrime;
}

/**
 * Adds weight × (bin mean of Airy |S1|², |S2|²) for the bow of order p (chords) to perp/par, on bins of width
 * stepDeg centred on thetaDeg; blend(j) in [0, 1] is the share given to Airy theory at bin j.
 */
export function addAiryBowBins(
  n: number,
  x: number,
  p: number,
  thetaDeg: Float64Array,
  stepDeg: number,
  weight: number,
  blend: Float64Array,
  perpendicular: Float64Array,
  parallel: Float64Array,
): void {
  const scale = airyBowScale(n, x, p - 1);
  const halfRad = (stepDeg / 2) * DEG;
  for (let j = 0; j < thetaDeg.length; j++) {
    const share = blend[j];
    if (share === 0) continue;
    const centre = (thetaDeg[j] - scale.rainbowAngleDeg) * DEG;
    const xi1 = scale.xiPerRad * (centre - halfRad);
    const xi2 = scale.xiPerRad * (centre + halfRad);
    // Mean of Ai²(−ξ) over [ξ1, ξ2] = (F(−ξ1) − F(−ξ2)) / (ξ2 − ξ1), F the antiderivative above.
    const mean = (airySquaredIntegral(-xi1) - airySquaredIntegral(-xi2)) / (xi2 - xi1);
    const w = weight * share * mean;
    perpendicular[j] += w * scale.perpendicularScale;
    parallel[j] += w * scale.parallelScale;
  }
}
