import type { MieAmplitudes } from "../types.js";

/**
 * S1 = ½(S₊ + S₋), S2 = ½(S₊ − S₋) of angle j from the kernels' output vectors: at m[base] the sums
 * S₊ = Σ w(a+b)(π+τ) re, im and S₋ = Σ w(a−b)(π−τ) re, im as f64x2 vectors, the angle's lane offset into base.
 */
export function amplitudeFromLanes(m: Float64Array, base: number, res: MieAmplitudes, j: number): void {
  const plusRe = m[base];
  const plusIm = m[base + 2];
  const minusRe = m[base + 4];
  const minusIm = m[base + 6];
  res.s1Re[j] = 0.5 * (plusRe + minusRe);
  res.s1Im[j] = 0.5 * (plusIm + minusIm);
  res.s2Re[j] = 0.5 * (plusRe - minusRe);
  res.s2Im[j] = 0.5 * (plusIm - minusIm);
}
