import { describe, it, expect } from "vitest";
import { readFileSync } from "node:fs";
import { mieCoefficients, mieCoefficientsPerfectConductor } from "../../../lib/mie/coefficients.js";
import { mieEfficiencies } from "../../../lib/mie/efficiencies.js";
import { mieAmplitudes } from "../../../lib/mie/amplitudes.js";
import { mieTermCount } from "../../../lib/mie/termCount.js";

// Reference: fixtures/mie/make_mie_reference.py, Bohren & Huffman 1983 eqs. 4.53 and 4.74 evaluated
// with mpmath at 60 digits and x + 10x^(1/3) + 30 terms (more than the engine's count).
interface RefCase {
  label: string;
  perfectConductor: boolean;
  mRe?: number;
  mIm?: number;
  x: number;
  termsUsed: number;
  tailBound: number;
  qExt: number;
  qSca: number;
  g: number;
  amplitudes: { angleDeg: number; s1Re: number; s1Im: number; s2Re: number; s2Im: number }[];
}
const ref = JSON.parse(readFileSync(new URL("../../../fixtures/mie/mie-reference.json", import.meta.url), "utf8")) as {
  cases: RefCase[];
};

// The product's accuracy goal for intensities: 1e-9 relative, point by point (every reference value is
// far from zero, so no floor is needed). Measured worst: 1.8e-11 (x = 3000, near 180°).
const REL_INTENSITY = 1e-9;
// Complex amplitudes (phase included), same goal, relative to |S|; measured worst 1.6e-10 (x = 50000).
const REL_AMPLITUDE = 1e-9;
// Efficiencies are sums of positive-definite or smooth terms: double rounding over ≤ 5e4 terms;
// measured worst 1e-14. Tolerance 1e-12.
const REL_Q = 1e-12;

function coefficientsFor(c: RefCase, nTerms?: number) {
  return c.perfectConductor ? mieCoefficientsPerfectConductor(c.x, nTerms) : mieCoefficients(c.mRe!, c.mIm!, c.x, nTerms);
}

function worstIntensityError(c: RefCase, nTerms?: number): number {
  const s = mieAmplitudes(coefficientsFor(c, nTerms), cosines(c));
  let worst = 0;
  c.amplitudes.forEach((r, i) => {
    const i1 = s.s1Re[i] ** 2 + s.s1Im[i] ** 2;
    const i2 = s.s2Re[i] ** 2 + s.s2Im[i] ** 2;
    worst = Math.max(worst, Math.abs(i1 / (r.s1Re ** 2 + r.s1Im ** 2) - 1), Math.abs(i2 / (r.s2Re ** 2 + r.s2Im ** 2) - 1));
  });
  return worst;
}

function cosines(c: RefCase): Float64Array {
  return Float64Array.from(c.amplitudes, (r) => Math.cos((r.angleDeg * Math.PI) / 180));
}

describe("Lorenz–Mie vs mpmath 60-digit reference (fixtures/mie/make_mie_reference.py)", () => {
  it("the reference covers x from 0.099 to 50000 and converged (omitted |a_n|, |b_n| < 1e-20)", () => {
    expect(ref.cases.length).toBe(9);
    for (const c of ref.cases) {
      expect(c.tailBound).toBeLessThan(1e-20);
      expect(c.termsUsed).toBeGreaterThan(mieTermCount(c.x));
    }
  });

  for (const c of ref.cases) {
    const name = c.perfectConductor ? `perfect conductor, x = ${c.x}` : `m = ${c.mRe} + ${c.mIm}i, x = ${c.x}`;
    it(`${name} (${c.label}): Qext, Qsca, g, S1, S2`, () => {
      const coeffs = coefficientsFor(c);
      const e = mieEfficiencies(coeffs, c.x);
      expect(Math.abs(e.qExt / c.qExt - 1)).toBeLessThan(REL_Q);
      expect(Math.abs(e.qSca / c.qSca - 1)).toBeLessThan(REL_Q);
      expect(Math.abs(e.g / c.g - 1)).toBeLessThan(REL_Q);
      const s = mieAmplitudes(coeffs, cosines(c));
      c.amplitudes.forEach((r, i) => {
        const d1 = Math.hypot(s.s1Re[i] - r.s1Re, s.s1Im[i] - r.s1Im) / Math.hypot(r.s1Re, r.s1Im);
        const d2 = Math.hypot(s.s2Re[i] - r.s2Re, s.s2Im[i] - r.s2Im) / Math.hypot(r.s2Re, r.s2Im);
        expect(d1, `S1 at ${r.angleDeg}°`).toBeLessThan(REL_AMPLITUDE);
        expect(d2, `S2 at ${r.angleDeg}°`).toBeLessThan(REL_AMPLITUDE);
      });
      expect(worstIntensityError(c)).toBeLessThan(REL_INTENSITY);
    });
  }

  it("Wiscombe's x + 4.05x^(1/3) + 2 terms would miss the 1e-9 goal near 180° (why mieTermCount uses 6)", () => {
    // Wiscombe 1980 (Appl. Opt. 19, 1505) criterion; measured 5e-7 at x = 3000 and 1.8e-6 at x = 50000.
    for (const label of ["water-x3000", "water-x50000"]) {
      const c = ref.cases.find((k) => k.label === label)!;
      expect(worstIntensityError(c, Math.ceil(c.x + 4.05 * Math.cbrt(c.x) + 2))).toBeGreaterThan(1e-7);
      expect(worstIntensityError(c)).toBeLessThan(REL_INTENSITY);
    }
  });
});
