import { describe, it, expect } from "vitest";
import { mieCoefficients } from "../../../lib/mie/coefficients.js";
import { mieCoefficientsScratch } from "../../../lib/mie/coefficients-scratch.js";
import { mieAmplitudes } from "../../../lib/mie/amplitudes.js";
import { manyDropsAvailable, mieAmplitudesManyDrops, MANY_DROPS_MAX_TERMS } from "../../../lib/mie/many-drops.js";
import { mieTermCount } from "../../../lib/mie/termCount.js";
import { allocateAmplitudes } from "../../../lib/mie/types.js";

// The many-drops kernel against the per-call kernel (which test/lib/mie/amplitude-kernels.test.ts checks against the
// mpmath reference): the same operations in the same order per drop and angle, so the same sums to the bit.

/** A small deterministic generator (mulberry32, common practice), so a failure names reproducible drops. */
function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function expectSameAsPerCall(mRe: number, mIm: number, xs: number[], cosTheta: Float64Array): void {
  const outs = xs.map(() => allocateAmplitudes(cosTheta.length));
  mieAmplitudesManyDrops(xs.length, (d) => mieCoefficientsScratch(mRe, mIm, xs[d]), cosTheta, outs);
  xs.forEach((x, d) => {
    const expected = mieAmplitudes(mieCoefficients(mRe, mIm, x), cosTheta);
    for (const part of ["s1Re", "s1Im", "s2Re", "s2Im"] as const) {
      expect(outs[d][part], `m = ${mRe} + ${mIm}i, x = ${x}, ${part}`).toEqual(expected[part]);
    }
  });
}

describe("Mie amplitudes of many drops per pass", () => {
  it("runs as WebAssembly on the supported Node versions", () => {
    expect(manyDropsAvailable).toBe(true);
  });

  it("equals the per-call kernel bit for bit on random drops and angle blocks, water to strongly absorbing", () => {
    const next = random(20261203);
    for (const [mRe, mIm] of [[1.333, 0], [1.34, 1e-8], [1.5, 0.05], [1.33, 0.5]]) {
      // 1–9 drops, x from 0.5 to 3,000 evenly in ln x; 1–41 angles anywhere in 0–180°, so blocks end part-filled.
      const xs = Array.from({ length: 1 + Math.floor(9 * next()) }, () => 0.5 * Math.exp(Math.log(6000) * next()));
      const cosTheta = Float64Array.from({ length: 1 + Math.floor(41 * next()) }, () => Math.cos(Math.PI * next()));
      expectSameAsPerCall(mRe, mIm, xs, cosTheta);
    }
  });

  it("equals the per-call kernel over many groups of angle blocks, the last group and block part-filled", () => {
    // 32 blocks of 4 angles per kernel call, taken in pairs (lib/mie/wasm/many-drops.wat, BLOCKS): 331 angles are 2
    // whole calls and one of 19 blocks (one of padding added), the last with 3 angles; drops of very different term
    // counts end in different chunks of orders.
    const next = random(14);
    const xs = [0.7, 40, 2500, 333, 9000, 2500.5];
    const cosTheta = Float64Array.from({ length: 331 }, () => Math.cos(Math.PI * next()));
    expectSameAsPerCall(1.335, 2e-9, xs, cosTheta);
  });

  it("equals the per-call kernel at the largest drops (3 mm in violet light), split into passes by size", () => {
    // x = 2π · 3000 µm / 0.38 µm ≈ 49,600; enough of them to overflow one pass's coefficient budget.
    const largest = (2 * Math.PI * 3000) / 0.38;
    const count = Math.ceil(MANY_DROPS_MAX_TERMS / mieTermCount(largest)) + 1;
    const xs = Array.from({ length: count }, (_, i) => largest * (1 - 0.01 * i));
    const cosTheta = Float64Array.from({ length: 7 }, (_, j) => Math.cos(((137 + 0.7 * j) * Math.PI) / 180));
    expectSameAsPerCall(1.343, 1e-8, xs, cosTheta);
  });
});
