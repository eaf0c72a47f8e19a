// Ray optics in one scattering half-plane, averaged over angle bins: the power of each segment of a plane sweep
// (lib/rays/plane-sweep.ts) spread evenly over the angles its ends reach, as lib/bow/ray-bins.ts does for spheres.
// Per unit Y = d_out·N the power is Σ |A|²/|∂Y/∂v|·Δu, and near the plane dΩ = dΘ·dY, so a bin's mean |S|²/x² is
// that power over the bin's width in Θ (radians).

import type { PlaneSweep } from "../rays/plane-sweep.js";
import type { RayBins } from "./ray-bins.js";
import { depositOverInterval } from "./ray-bins.js";

const DEG = Math.PI / 180;

/**
 * Bin means of |S1|²/x², |S2|²/x² in the half-plane `side` (+1: Θ measured towards the plane's e; −1: the opposite
 * half-plane) from the sweep's segments, leaving out the segments whose index s (segment from sample s to s + 1)
 * has skip[s] = 1. Adds into `into` when given.
 */
export function planeRayBins(
  sweep: PlaneSweep,
  side: 1 | -1,
  thetaDeg: Float64Array,
  stepDeg: number,
  skip?: Uint8Array,
  into?: RayBins,
): RayBins {
  const count = thetaDeg.length;
  const out = into ?? { perpendicular: new Float64Array(count), parallel: new Float64Array(count) };
  const perp = new Float64Array(count);
  const par = new Float64Array(count);
  const firstEdgeDeg = thetaDeg[0] - stepDeg / 2;
  const { u, ok, thetaSigned: t, perpPerU, parPerU } = sweep;
  for (let s = 0; s + 1 < u.length; s++) {
    if (!ok[s] || !ok[s + 1] || (skip && skip[s])) continue;
    const a = side * t[s];
    const b = side * t[s + 1];
    // Both ends in this half-plane, and not folding through Θ = 0 or 180° (axis and glory: left out, as for spheres).
    if (!(a > 0 && b > 0) || Math.abs(a - b) > Math.PI / 2) continue;
    const du = Math.abs(u[s + 1] - u[s]);
    depositOverInterval(perp, 0.5 * (perpPerU[s] + perpPerU[s + 1]) * du, a / DEG, b / DEG, firstEdgeDeg, stepDeg);
    depositOverInterval(par, 0.5 * (parPerU[s] + parPerU[s + 1]) * du, a / DEG, b / DEG, firstEdgeDeg, stepDeg);
  }
  const stepRad = stepDeg * DEG;
  for (let j = 0; j < count; j++) {
    out.perpendicular[j] += perp[j] / stepRad;
    out.parallel[j] += par[j] / stepRad;
  }
  return out;
}
