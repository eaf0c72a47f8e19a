// The one packing of a_n, b_n that both angle kernels read (lib/mie/amplitudes.ts and the WebAssembly kernels in
// lib/mie/wasm/): one sequential stream per partial wave, so the angle loops do no division and no indexing by n.

import type { MieCoefficients } from "./types.js";

/**
 * f64 values per partial wave n: w(a_n + b_n) re, im, w(a_n − b_n) re, im, (n+1)/n, n, with
 * w = (2n+1)/(n(n+1)) (the weight of Bohren & Huffman 1983 eq. 4.74) and (n+1)/n of the π_n recurrence (eq. 4.47).
 */
export const PACKED_STRIDE = 6;

/** Writes c's packed stream into target from index at (c.nTerms · PACKED_STRIDE values). */
export function packCoefficients(c: MieCoefficients, target: Float64Array, at = 0): void {
  for (let i = 0, k = at; i < c.nTerms; i++, k += PACKED_STRIDE) {
    const n = i + 1;
    const w = (2 * n + 1) / (n * (n + 1));
    target[k] = w * (c.aRe[i] + c.bRe[i]);
    target[k + 1] = w * (c.aIm[i] + c.bIm[i]);
    target[k + 2] = w * (c.aRe[i] - c.bRe[i]);
    target[k + 3] = w * (c.aIm[i] - c.bIm[i]);
    target[k + 4] = (n + 1) / n;
    target[k + 5] = n;
  }
}
