import { describe, it, expect } from "vitest";
import { mieCoefficients } from "../../../lib/mie/coefficients.js";
import { mieEfficiencies } from "../../../lib/mie/efficiencies.js";
import { mieAmplitudes } from "../../../lib/mie/amplitudes.js";
import { mieScatter } from "../../../lib/mie/scatter.js";

describe("Lorenz–Mie energy conservation (non-absorbing sphere: Qext = Qsca from B&H 1983 eqs. 4.61, 4.62)", () => {
  // Per term Re a_n = |a_n|² exactly for real m; only rounding separates the two sums. Tolerance 1e-12.
  for (const x of [1, 100, 10000, 50000]) {
    it(`m = 1.333, x = ${x}`, () => {
      const e = mieEfficiencies(mieCoefficients(1.333, 0, x), x);
      expect(Math.abs(e.qExt - e.qSca) / e.qExt).toBeLessThan(1e-12);
    });
  }
});

describe("Lorenz–Mie optical theorem: Qext = 4 Re S(0°)/x² (Bohren & Huffman 1983 ch. 3–4; equation number not checked)", () => {
  // Two different sums over the same coefficients; rounding only. Tolerance 1e-12.
  for (const [mRe, mIm, x] of [[1.5, 1, 100], [1.33, 1e-5, 10000], [10, 10, 1000]]) {
    it(`m = ${mRe} + ${mIm}i, x = ${x}`, () => {
      const c = mieCoefficients(mRe, mIm, x);
      const s = mieAmplitudes(c, Float64Array.of(1));
      expect(Math.abs((4 * s.s1Re[0]) / (x * x) / mieEfficiencies(c, x).qExt - 1)).toBeLessThan(1e-12);
    });
  }
});

describe("Rayleigh limit (Bohren & Huffman 1983 §5.1)", () => {
  // Qsca → (8/3) x⁴ |(m²−1)/(m²+2)|² (B&H eq. 5.8) and Qabs → 4x Im[(m²−1)/(m²+2)] (B&H eq. 5.11,
  // equation number from memory). The next terms of the expansion are O(x²) relative (B&H §5.1), so the
  // deviation must be below 3x² and shrink by ~100 from x = 0.1 to 0.01.
  const polar = (mRe: number, mIm: number) => {
    // (m²−1)/(m²+2) for complex m
    const m2Re = mRe * mRe - mIm * mIm;
    const m2Im = 2 * mRe * mIm;
    const nRe = m2Re - 1;
    const dRe = m2Re + 2;
    const d2 = dRe * dRe + m2Im * m2Im;
    return { re: (nRe * dRe + m2Im * m2Im) / d2, im: (m2Im * dRe - nRe * m2Im) / d2 };
  };
  for (const [mRe, mIm] of [[1.33, 0], [1.5, 0.1]]) {
    it(`m = ${mRe} + ${mIm}i`, () => {
      const p = polar(mRe, mIm);
      const deviation = (x: number) => {
        const e = mieEfficiencies(mieCoefficients(mRe, mIm, x), x);
        const qSca = (8 / 3) * x ** 4 * (p.re * p.re + p.im * p.im);
        const dev = { sca: Math.abs(e.qSca / qSca - 1), abs: 0 };
        if (mIm > 0) dev.abs = Math.abs((e.qExt - e.qSca) / (4 * x * p.im) - 1);
        return dev;
      };
      const d1 = deviation(0.1);
      const d2 = deviation(0.01);
      expect(d1.sca).toBeLessThan(3 * 0.1 ** 2);
      expect(d2.sca).toBeLessThan(3 * 0.01 ** 2);
      expect(d1.sca / d2.sca).toBeGreaterThan(50);
      expect(d1.sca / d2.sca).toBeLessThan(200);
      if (mIm > 0) {
        expect(d1.abs).toBeLessThan(3 * 0.1 ** 2);
        expect(d2.abs).toBeLessThan(3 * 0.01 ** 2);
      }
    });
  }
});

describe("stability at x = 50000 (r = 3 mm, the largest radius integrated by default, at 380 nm)", () => {
  // Extinction paradox: Qext → 2 from above as x → ∞ (van de Hulst 1957 §8.22, from memory);
  // Wiscombe's x = 10000 cases give 2.0041–2.0059, so at x = 50000 it must lie in (2, 2.006).
  const angles = Float64Array.from({ length: 181 }, (_, i) => i);
  for (const [mRe, mIm] of [[1.333, 0], [1.33, 1e-5], [1.5, 1], [10, 10]]) {
    it(`m = ${mRe} + ${mIm}i: finite amplitudes, Qext → 2, Qsca ≤ Qext`, () => {
      const r = mieScatter(mRe, mIm, 50000, angles);
      for (const a of [r.s1Re, r.s1Im, r.s2Re, r.s2Im]) expect(a.every(Number.isFinite)).toBe(true);
      expect(r.qExt).toBeGreaterThan(2);
      expect(r.qExt).toBeLessThan(2.006);
      expect(r.qSca).toBeLessThanOrEqual(r.qExt * (1 + 1e-12));
      expect(Math.abs((4 * r.s1Re[0]) / 50000 ** 2 / r.qExt - 1)).toBeLessThan(1e-12);
    });
  }
});

describe("input checks", () => {
  it("rejects x ≤ 0, non-finite m and a negative imaginary part (Wiscombe's sign, not ours)", () => {
    expect(() => mieCoefficients(1.33, 0, 0)).toThrow(RangeError);
    expect(() => mieCoefficients(Number.NaN, 0, 1)).toThrow(RangeError);
    expect(() => mieCoefficients(1.33, -1e-5, 1)).toThrow(RangeError);
    expect(() => mieAmplitudes(mieCoefficients(1.33, 0, 1), new Float64Array(3), { s1Re: new Float64Array(2), s1Im: new Float64Array(3), s2Re: new Float64Array(3), s2Im: new Float64Array(3) })).toThrow(RangeError);
  });
});
