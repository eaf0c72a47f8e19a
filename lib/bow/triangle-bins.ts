// Spreading the power of a small triangle of rays over bins of scattering angle. A pupil cell's rays leave at angles
// that vary about linearly across it, so the cell's power, uniform over the cell, lands on Θ with the density of a
// linear function's values over a triangle: the triangular distribution between the smallest and largest vertex angle
// with its mode at the middle one (the image of a uniform triangle under a linear map; Evans, Hastings & Peacock 2000,
// Statistical Distributions, 3rd ed., ch. 40, from memory), whose distribution function is piecewise quadratic.

/** The triangular distribution's distribution function at t for vertex values lo ≤ mid ≤ hi (lo < hi). */
function triangularCdf(t: number, lo: number, mid: number, hi: number): number {
  if (t <= lo) return 0;
  if (t >= hi) return 1;
  if (t <= mid) return ((t - lo) * (t - lo)) / ((hi - lo) * (mid - lo));
  return 1 - ((hi - t) * (hi - t)) / ((hi - lo) * (hi - mid));
}

/**
 * Adds energyA into binsA and energyB into binsB (bins of width stepDeg from firstEdgeDeg; the two polarisations of one
 * triangle of rays), each spread over Θ as a triangle of the pupil whose vertices leave at a, b and c (degrees) spreads it.
 */
export function depositOverTriangle(
  binsA: Float64Array,
  energyA: number,
  binsB: Float64Array,
  energyB: number,
  a: number,
  b: number,
  c: number,
  firstEdgeDeg: number,
  stepDeg: number,
): void {
  if (energyA === 0 && energyB === 0) return;
  const lo = Math.min(a, b, c);
  const hi = Math.max(a, b, c);
  const count = binsA.length;
  const jFirst = Math.floor((lo - firstEdgeDeg) / stepDeg);
  const jLast = Math.floor((hi - firstEdgeDeg) / stepDeg);
  if (jLast < 0 || jFirst >= count) return;
  // Within one bin (most cells of a fine pupil): all of it there.
  if (jFirst === jLast) {
    binsA[jFirst] += energyA;
    binsB[jFirst] += energyB;
    return;
  }
  const mid = a + b + c - lo - hi;
  const from = Math.max(0, jFirst);
  const to = Math.min(count - 1, jLast);
  let below = triangularCdf(firstEdgeDeg + from * stepDeg, lo, mid, hi);
  for (let j = from; j <= to; j++) {
    const above = triangularCdf(firstEdgeDeg + (j + 1) * stepDeg, lo, mid, hi);
    const share = above - below;
    binsA[j] += energyA * share;
    binsB[j] += energyB * share;
    below = above;
  }
}
