// Ray optics averaged over angle bins: the energy of every ray of order p that lands in a bin, divided by the
// bin's solid angle. Unlike point values of the divergence factor this stays finite at the bow (caustic) and
// needs no root finding, and it scales as x², so one pass per refractive index serves every drop size.

import { deviationRad, scatteringAngleOfDeviation } from "../rays/descartes.js";
import { pathTransmittance } from "../rays/fresnel.js";

const DEG = Math.PI / 180;

/** Impact-parameter segments per order: the deposit is exact for piecewise-linear Θ(b), so error ~ segment². */
const SEGMENTS = 4000;

export interface RayBins {
  /** Bin means of |S1|²/x² and |S2|²/x² (Bohren–Huffman convention divided by x²), one per bin centre. */
  perpendicular: Float64Array;
  parallel: Float64Array;
}

/**
 * Bin-averaged ray-optics |S_j|²/x² for the orders p (chords in the drop: 0 external reflection, 1 straight
 * through, 2 primary bow, …) on bins of width stepDeg centred on thetaDeg (ascending, uniform).
 * Power of the rays with impact parameter in db: 2π a² b db ε_j² (van de Hulst 1957 §12.2); the bin's solid
 * angle is 2π (cos Θ1 − cos Θ2); and dσ/dΩ = |S_j|²/k² (Bohren & Huffman 1983 Eq. 3.16), so
 * |S_j|²/x² = Σ ε_j² b db / (cos Θ1 − cos Θ2).
 */
export function rayOpticsBins(n: number, orders: readonly number[], thetaDeg: Float64Array, stepDeg: number): RayBins {
  const count = thetaDeg.length;
  const perpendicular = new Float64Array(count);
  const parallel = new Float64Array(count);
  if (count === 0) return { perpendicular, parallel };
  const firstEdgeDeg = thetaDeg[0] - stepDeg / 2;
  const lastEdgeDeg = firstEdgeDeg + count * stepDeg;
  const { impact, incidence, refraction } = segmentGeometry(n);
  for (const p of orders) {
    const k = p - 1;
    let bPrev = 0;
    let thetaPrev = scatteringAngleOfDeviation(deviationRad(n, k, 0)).angle / DEG;
    for (let s = 1; s <= SEGMENTS; s++) {
      const b = impact[s];
      // D(b) = 2i − 2p·r + (p − 1)π (van de Hulst 1957 §12.2), as deviationRad computes it, from the shared angles.
      const theta = scatteringAngleOfDeviation(2 * incidence[s] - 2 * p * refraction[s] + (p - 1) * Math.PI).angle / DEG;
      if (Math.max(theta, thetaPrev) < firstEdgeDeg || Math.min(theta, thetaPrev) > lastEdgeDeg) {
        // Lands outside the grid: nothing to deposit, so no Fresnel factors to compute.
        bPrev = b;
        thetaPrev = theta;
        continue;
      }
      const bMid = 0.5 * (b + bPrev);
      const eps = pathTransmittance(n, k, Math.min(bMid, 1 - 1e-15));
      const weight = bMid * (b - bPrev);
      deposit(perpendicular, weight * eps.perpendicular, thetaPrev, theta, firstEdgeDeg, stepDeg);
      deposit(parallel, weight * eps.parallel, thetaPrev, theta, firstEdgeDeg, stepDeg);
      bPrev = b;
      thetaPrev = theta;
    }
  }
  for (let j = 0; j < count; j++) {
    const lo = (thetaDeg[j] - stepDeg / 2) * DEG;
    const hi = (thetaDeg[j] + stepDeg / 2) * DEG;
    const solid = Math.abs(Math.cos(Math.max(lo, 0)) - Math.cos(Math.min(hi, Math.PI)));
    perpendicular[j] /= solid;
    parallel[j] /= solid;
  }
  return { perpendicular, parallel };
}

/**
 * Segment ends b_s = sin(s/SEGMENTS · π/2) (they crowd towards grazing incidence, where Θ(b) turns fastest) and
 * their angles i = asin b, r = asin(b/n), shared by every order: the arcsines are most of the cost. The last
 * index of refraction is kept, as one drop-row context asks for several orders at the same n.
 */
let geometry = { n: NaN, impact: new Float64Array(0), incidence: new Float64Array(0), refraction: new Float64Array(0) };
function segmentGeometry(n: number): typeof geometry {
  if (geometry.n === n) return geometry;
  const impact = new Float64Array(SEGMENTS + 1);
  const incidence = new Float64Array(SEGMENTS + 1);
  const refraction = new Float64Array(SEGMENTS + 1);
  for (let s = 0; s <= SEGMENTS; s++) {
    impact[s] = Math.sin(((s / SEGMENTS) * Math.PI) / 2);
    const b = Math.min(impact[s], 1 - 1e-15);
    incidence[s] = Math.asin(b);
    refraction[s] = Math.asin(b / n);
  }
  geometry = { n, impact, incidence, refraction };
  return geometry;
}

/** Spreads energy uniformly over the angle interval [a, b] (degrees) into the bins it overlaps. */
export { deposit as depositOverInterval };
function deposit(bins: Float64Array, energy: number, a: number, b: number, firstEdgeDeg: number, stepDeg: number): void {
  if (energy === 0) return;
  const lo = Math.min(a, b);
  const hi = Math.max(a, b);
  const count = bins.length;
  const lastEdge = firstEdgeDeg + count * stepDeg;
  if (hi < firstEdgeDeg || lo > lastEdge) return;
  const width = hi - lo;
  if (width < 1e-12) {
    const j = Math.floor((lo - firstEdgeDeg) / stepDeg);
    if (j >= 0 && j < count) bins[j] += energy;
    return;
  }
  const jFirst = Math.max(0, Math.floor((lo - firstEdgeDeg) / stepDeg));
  const jLast = Math.min(count - 1, Math.floor((hi - firstEdgeDeg) / stepDeg));
  for (let j = jFirst; j <= jLast; j++) {
    const binLo = firstEdgeDeg + j * stepDeg;
    const overlap = Math.min(hi, binLo + stepDeg) - Math.max(lo, binLo);
    if (overlap > 0) bins[j] += (energy * overlap) / width;
  }
}
