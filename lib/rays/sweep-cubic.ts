// Values between the samples of a plane sweep (lib/rays/plane-sweep.ts): the cubic through the four nearest
// samples in u, by Lagrange's formula on unequal nodes (Press et al. 2007, Numerical Recipes §3.2, Eq. 3.2.1),
// with its first and second derivatives. Everything a sweep carries (Θ, amplitudes, optical path, offset) is
// smooth in u within a run of rays that leave in the plane, so the error is ~ Δu⁴·f⁗/24 (Δu the sample spacing).

export interface CubicWeights {
  /** Index of the first of the four samples. */
  first: number;
  value: Float64Array;
  slope: Float64Array;
  curvature: Float64Array;
}

export function allocateCubic(): CubicWeights {
  return { first: 0, value: new Float64Array(4), slope: new Float64Array(4), curvature: new Float64Array(4) };
}

/**
 * Weights at u of the cubic through samples first … first + 3 of `nodes`, chosen so that u lies in the middle
 * cell where it can, within the run lo … hi (inclusive, at least four samples, nodes ascending).
 */
export function cubicWeights(nodes: Float64Array, lo: number, hi: number, u: number, out: CubicWeights): CubicWeights {
  // The cell [nodes[s], nodes[s + 1]] that holds u, by bisection.
  let a = lo;
  let b = hi;
  while (b - a > 1) {
    const m = (a + b) >> 1;
    if (nodes[m] <= u) a = m;
    else b = m;
  }
  const first = Math.min(Math.max(a - 1, lo), hi - 3);
  out.first = first;
  for (let k = 0; k < 4; k++) {
    const uk = nodes[first + k];
    // ℓ_k(u) = Π_{m≠k} (u − u_m)/(u_k − u_m); its derivatives by the product rule on the three factors.
    // The three factors u − u_m (m ≠ k), in m's order.
    let denominator = 1;
    let f0 = 0;
    let f1 = 0;
    let f2 = 0;
    let factors = 0;
    for (let m = 0; m < 4; m++) {
      if (m === k) continue;
      const um = nodes[first + m];
      denominator *= uk - um;
      const factor = u - um;
      if (factors === 0) f0 = factor;
      else if (factors === 1) f1 = factor;
      else f2 = factor;
      factors++;
    }
    out.value[k] = (f0 * f1 * f2) / denominator;
    out.slope[k] = (f1 * f2 + f0 * f2 + f0 * f1) / denominator;
    out.curvature[k] = (2 * (f0 + f1 + f2)) / denominator;
  }
  return out;
}

/** Σ w_k·values[first + k]: the interpolated value (or slope, or curvature, with those weights). */
export function applyCubic(weights: Float64Array, first: number, values: Float64Array, scale = 1): number {
  return scale * (weights[0] * values[first] + weights[1] * values[first + 1] + weights[2] * values[first + 2] + weights[3] * values[first + 3]);
}
