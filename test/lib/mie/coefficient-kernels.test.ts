import { describe, it, expect } from "vitest";
import { createMieWorkspace, mieCoefficients, mieCoefficientsScalar } from "../../../lib/mie/coefficients.js";
import { simdCoefficientsAvailable } from "../../../lib/mie/simd-coefficients.js";

// mieCoefficients forms the ratios of Bohren & Huffman 1983 eq. 4.88 on WebAssembly SIMD lanes, two orders per vector
// (lib/mie/wasm/coefficients.wat). Same IEEE-754 double operations in the same order as the TypeScript loop, with no
// fused multiply-add on either side, so the coefficients must agree to the bit: odd and even term counts (the last
// lane of an odd count runs one order past the end), one and two orders, weak and strong absorption, small and large x.
const cases: [mRe: number, mIm: number, x: number, nTerms?: number][] = [
  [1.333, 0, 3000],
  [1.333, 1e-8, 50000],
  [1.34, 1e-8, 150],
  [1.5, 0.5, 2.5],
  [1.33, 1e-5, 10000],
  [2.0, 1.0, 0.1],
  [1.333, 0, 40, 1],
  [1.333, 0, 40, 2],
  [1.333, 2e-9, 1200, 1201],
];

describe("Mie coefficients: WebAssembly SIMD ratios and the TypeScript loop", () => {
  it("WebAssembly SIMD runs on the supported Node versions (package.json engines: Node ≥ 20.19)", () => {
    expect(simdCoefficientsAvailable).toBe(true);
  });

  for (const [mRe, mIm, x, nTerms] of cases) {
    it(`m = ${mRe} + ${mIm}i, x = ${x}${nTerms ? `, ${nTerms} orders` : ""}: the same coefficients to the bit`, () => {
      const simd = mieCoefficients(mRe, mIm, x, nTerms);
      const scalar = mieCoefficientsScalar(mRe, mIm, x, nTerms);
      expect(simd.nTerms).toBe(scalar.nTerms);
      for (const part of ["aRe", "aIm", "bRe", "bIm"] as const) expect(simd[part], part).toEqual(scalar[part]);
    });
  }

  // The TypeScript loop into a reused workspace (the path where WebAssembly SIMD is missing), larger and smaller
  // drops in turn: the same values as into fresh arrays (stale tails must not leak in).
  it("the TypeScript loop into one reused workspace equals fresh arrays bit for bit, in any order of sizes", () => {
    const workspace = createMieWorkspace();
    for (const [mRe, mIm, x, nTerms] of [...cases, ...cases.slice().reverse()]) {
      const expected = mieCoefficientsScalar(mRe, mIm, x, nTerms);
      const got = mieCoefficientsScalar(mRe, mIm, x, nTerms, workspace);
      expect(got.nTerms).toBe(expected.nTerms);
      for (const part of ["aRe", "aIm", "bRe", "bIm"] as const) expect(got[part].subarray(0, got.nTerms), part).toEqual(expected[part]);
    }
  });
});
