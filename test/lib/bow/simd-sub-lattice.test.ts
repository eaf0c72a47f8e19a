import { describe, it, expect } from "vitest";
import { interpolateSubLattice, kaiserSincWeights, subLatticeNodes, subLatticeWeights, SUB_LATTICE_POINTS } from "../../../lib/bow/mie-sub-lattice.js";
import { interpolateSubLatticeSimd, simdSubLatticeAvailable } from "../../../lib/bow/simd-sub-lattice.js";

// The WebAssembly interpolation against the TypeScript loop it repeats (its reference): the same weights, the taps
// summed in the same order with separate multiply and add in IEEE-754 double (WebAssembly core spec 2.0 §4.3.3), so
// the values must be equal to the bit, including the clamp of negative sums to zero.

/** Deterministic test rows: a linear congruential generator (Knuth 1997 §3.2.1), multiplier and increment of Press et al. 1992 §7.1 (from memory). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

function both(c: number, lo: number, hi: number, points: number, weights: Float64Array, random: () => number, negative: boolean) {
  const { qLo, qHi } = subLatticeNodes(lo, hi, c, points);
  const n = qHi - qLo + 1;
  const row = () => Float64Array.from({ length: n }, () => (negative ? random() - 0.3 : random()) * 10 ** (6 * random() - 3));
  const coarseA = row();
  const coarseB = row();
  const out = () => ({ a: new Float64Array(hi - lo + 1).fill(NaN), b: new Float64Array(hi - lo + 1).fill(NaN) });
  const js = out();
  const simd = out();
  interpolateSubLattice(coarseA, coarseB, qLo, c, weights, lo, hi, js.a, js.b, points);
  const ran = interpolateSubLatticeSimd(coarseA, coarseB, qLo, c, weights, lo, hi, simd.a, simd.b, points);
  return { js, simd, ran };
}

describe("Sub-lattice interpolation on WebAssembly SIMD", () => {
  it.skipIf(!simdSubLatticeAvailable)("equals the TypeScript loop to the bit, both rows, every factor, span and tap count", () => {
    const random = lcg(14);
    let clamped = 0;
    for (const points of [SUB_LATTICE_POINTS, 32, 8]) {
      for (const c of [2, 3, 5, 7, 12, 31]) {
        const weights = points === SUB_LATTICE_POINTS ? subLatticeWeights(c) : kaiserSincWeights(c, points, 14);
        // spans: short (fewer than four outputs a residue), long, starting on and off a node, and below index 0
        for (const [lo, hi] of [[400, 402], [400, 1200], [401, 1999], [-37, 250], [0, 3 * c + 1]]) {
          for (const negative of [false, true]) {
            const { js, simd, ran } = both(c, lo, hi, points, weights, random, negative);
            expect(ran).toBe(true);
            expect(Array.from(simd.a)).toEqual(Array.from(js.a));
            expect(Array.from(simd.b)).toEqual(Array.from(js.b));
            clamped += js.a.filter((v) => v === 0).length;
          }
        }
      }
    }
    // the negative rows did reach the clamp
    expect(clamped).toBeGreaterThan(0);
  });

  it.skipIf(!simdSubLatticeAvailable)("reuses its memory for a smaller call and grows it for a larger one", () => {
    const random = lcg(7);
    for (const [lo, hi] of [[0, 20000], [10, 30], [0, 90000]]) {
      const { js, simd } = both(4, lo, hi, SUB_LATTICE_POINTS, subLatticeWeights(4), random, false);
      expect(Array.from(simd.a)).toEqual(Array.from(js.a));
      expect(Array.from(simd.b)).toEqual(Array.from(js.b));
    }
  });
});
