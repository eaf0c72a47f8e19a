import { describe, it, expect } from "vitest";
import { readFileSync } from "node:fs";
import { mieCoefficients, mieCoefficientsPerfectConductor } from "../../../lib/mie/coefficients.js";
import { mieAmplitudesScalar } from "../../../lib/mie/amplitudes.js";
import { createSimdAmplitudes, mieAmplitudesSimd, simdAmplitudesAvailable } from "../../../lib/mie/simd-amplitudes.js";
import { mieCoefficientsScratch } from "../../../lib/mie/coefficients-scratch.js";
import { allocateAmplitudes, type MieAmplitudes } from "../../../lib/mie/types.js";
import { wasmModules } from "../../../lib/mie/wasm/modules.generated.js";

// Both angle kernels (the scalar TypeScript reference and the WebAssembly SIMD one that mieAmplitudes uses) against
// fixtures/mie/make_mie_reference.py: Bohren & Huffman 1983 eqs. 4.53 and 4.74 with mpmath at 60 digits.
interface RefCase {
  label: string;
  perfectConductor: boolean;
  mRe?: number;
  mIm?: number;
  x: number;
  amplitudes: { angleDeg: number; s1Re: number; s1Im: number; s2Re: number; s2Im: number }[];
}
const ref = JSON.parse(readFileSync(new URL("../../../fixtures/mie/mie-reference.json", import.meta.url), "utf8")) as { cases: RefCase[] };

// The product's accuracy goal for complex amplitudes, relative to |S| (as test/lib/mie/mpmath-reference.test.ts).
const REL_AMPLITUDE = 1e-9;

const coefficientsFor = (c: RefCase) => (c.perfectConductor ? mieCoefficientsPerfectConductor(c.x) : mieCoefficients(c.mRe!, c.mIm!, c.x));
const cosines = (anglesDeg: ArrayLike<number>) => Float64Array.from(anglesDeg, (a) => Math.cos((a * Math.PI) / 180));

function worstAmplitudeError(c: RefCase, s: MieAmplitudes): number {
  let worst = 0;
  c.amplitudes.forEach((r, i) => {
    const d1 = Math.hypot(s.s1Re[i] - r.s1Re, s.s1Im[i] - r.s1Im) / Math.hypot(r.s1Re, r.s1Im);
    const d2 = Math.hypot(s.s2Re[i] - r.s2Re, s.s2Im[i] - r.s2Im) / Math.hypot(r.s2Re, r.s2Im);
    worst = Math.max(worst, d1, d2);
  });
  return worst;
}

describe("Mie angle kernels: scalar reference and WebAssembly SIMD", () => {
  it("WebAssembly SIMD runs on the supported Node versions (package.json engines: Node ≥ 20.19)", () => {
    expect(simdAmplitudesAvailable).toBe(true);
  });

  for (const c of ref.cases) {
    it(`${c.label}: both kernels within ${REL_AMPLITUDE} of the mpmath amplitudes`, () => {
      const coefficients = coefficientsFor(c);
      const mu = cosines(c.amplitudes.map((r) => r.angleDeg));
      expect(worstAmplitudeError(c, mieAmplitudesScalar(coefficients, mu))).toBeLessThan(REL_AMPLITUDE);
      const simd = mieAmplitudesSimd(coefficients, mu, allocateAmplitudes(mu.length));
      expect(simd).not.toBeNull();
      expect(worstAmplitudeError(c, simd!)).toBeLessThan(REL_AMPLITUDE);
    });
  }

  // Same IEEE-754 double operations in the same order, with no fused multiply-add on either side (ECMAScript and
  // WebAssembly both round each product), so the sums agree to the bit; 803 angles leave a partial group of 8.
  // (The fused variant, where relaxed SIMD is on, is checked in fused-kernels.test.ts.)
  it("the exact SIMD kernel reproduces the scalar one bit for bit over a profile's angles (x = 1500, 803 angles)", () => {
    const coefficients = mieCoefficients(1.333, 1e-9, 1500);
    const mu = cosines(Array.from({ length: 803 }, (_, j) => 115 + 0.05 * j));
    const scalar = mieAmplitudesScalar(coefficients, mu);
    const used = createSimdAmplitudes("exact")!(coefficients, mu, allocateAmplitudes(mu.length))!;
    for (const part of ["s1Re", "s1Im", "s2Re", "s2Im"] as const) expect(used[part]).toEqual(scalar[part]);
  });

  // The SIMD kernel runs the orders in chunks (a table of π ± τ per chunk, lib/mie/wasm/amplitudes.wat): one order,
  // a chunk less one, exactly one, one more, and two chunks must all give the scalar kernel's sums to the bit.
  it("the exact SIMD kernel equals the scalar one bit for bit at every chunk edge of the orders", () => {
    const chunk = wasmModules.amplitudes.constants.CHUNK;
    const mu = cosines(Array.from({ length: 37 }, (_, j) => 100 + 1.7 * j));
    const exact = createSimdAmplitudes("exact")!;
    for (const nTerms of [1, chunk - 1, chunk, chunk + 1, 2 * chunk]) {
      const coefficients = mieCoefficients(1.334, 2e-9, 2 * chunk, nTerms);
      const scalar = mieAmplitudesScalar(coefficients, mu);
      const simd = exact(coefficients, mu, allocateAmplitudes(mu.length))!;
      for (const part of ["s1Re", "s1Im", "s2Re", "s2Im"] as const) expect(simd[part], `${nTerms} orders, ${part}`).toEqual(scalar[part]);
    }
  });

  // The profile loop's coefficients repeat mieCoefficients' operations into reused buffers: equal to the bit, also
  // when a smaller drop follows a larger one (stale tails must not leak in).
  it("scratch coefficients equal mieCoefficients bit for bit, in any order of sizes", () => {
    for (const [mRe, mIm, x] of [[1.333, 0, 3000], [1.34, 1e-8, 150], [1.5, 0.5, 2.5], [1.333, 1e-5, 10000], [1.33, 0, 40]]) {
      const expected = mieCoefficients(mRe, mIm, x);
      const got = mieCoefficientsScratch(mRe, mIm, x);
      expect(got.nTerms).toBe(expected.nTerms);
      for (const part of ["aRe", "aIm", "bRe", "bIm"] as const) expect(got[part].subarray(0, got.nTerms)).toEqual(expected[part]);
    }
  });
});
