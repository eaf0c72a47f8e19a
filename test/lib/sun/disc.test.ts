import { describe, it, expect } from "vitest";
import { neckelLabs1994 } from "../../../lib/data/neckel-labs-1994-limb-darkening.js";
import {
  SUN_MEAN_ANGULAR_DIAMETER_DEG, convolveProfile, discMeanOverCentre, limbDarkening, limbDarkeningCoefficients, sunDiscKernel,
} from "../../../lib/sun/index.js";

const sumOf = (a: Float64Array) => a.reduce((s, v) => s + v, 0);
const secondMoment = (k: { offsetsDeg: Float64Array; weights: Float64Array }) =>
  k.weights.reduce((s, w, i) => s + w * k.offsetsDeg[i] ** 2, 0);

describe("solar disc size (IAU 2015 Resolution B3, IAU 2012 Resolution B2)", () => {
  it("mean angular diameter 2 asin(R☉/au) = 0.532906° (computed from IAU 2015 B3 radius and IAU 2012 B2 au)", () => {
    expect(Math.abs(SUN_MEAN_ANGULAR_DIAMETER_DEG - 0.532906)).toBeLessThan(5e-7);
  });
});

describe("limb darkening, Neckel & Labs 1994 (Sol. Phys. 153, 91; coefficient table)", () => {
  it("at 559.95 nm: I(0.5)/I(1) = 0.71310, I(0)/I(1) = 0.26892, I(1) = 1 (5 decimals → 5e-6)", () => {
    const a = limbDarkeningCoefficients(559.95);
    expect(Math.abs(limbDarkening(0.5, a) - 0.7131)).toBeLessThan(5e-6);
    expect(Math.abs(limbDarkening(0, a) - 0.26892)).toBeLessThan(5e-6);
    expect(Math.abs(limbDarkening(1, a) - 1)).toBeLessThan(2e-5);
  });
  it("disc mean / centre = 0.8061 at 559.95 nm (published column; 4 decimals → 5e-5) and every row but 365.875 nm within 1e-4", () => {
    expect(Math.abs(discMeanOverCentre(limbDarkeningCoefficients()) - 0.8061)).toBeLessThan(5e-5);
    neckelLabs1994.wavelengthsNm.forEach((w, i) => {
      if (w === 365.875) return; // suspect row in the copy, see fixtures/reference/README.md
      expect(Math.abs(discMeanOverCentre(limbDarkeningCoefficients(w)) - neckelLabs1994.columns.meanOverCentre[i]), `${w} nm`).toBeLessThan(1e-4);
    });
  });
  it("interpolates between rows and refuses wavelengths outside 303–1099 nm", () => {
    const mid = limbDarkening(0.5, limbDarkeningCoefficients((541.76 + 559.95) / 2));
    const avg = (limbDarkening(0.5, limbDarkeningCoefficients(541.76)) + limbDarkening(0.5, limbDarkeningCoefficients(559.95))) / 2;
    expect(mid).toBeCloseTo(avg, 12);
    expect(() => limbDarkeningCoefficients(300)).toThrow(RangeError);
  });
});

describe("disc kernel projected on the ψ axis", () => {
  const d = SUN_MEAN_ANGULAR_DIAMETER_DEG;
  const r = d / 2;
  // Bins of width s add at most s²/12 of spread: with s = R/500, (1/3)(s/R)² ≈ 1.3e-6 of R²/4; tolerance 1e-5 relative.
  const step = r / 500;
  it("uniform disc: weights sum to 1 and the second moment is R²/4 (analytic, projected uniform disc)", () => {
    const k = sunDiscKernel(d, step, undefined, "uniform");
    expect(Math.abs(sumOf(k.weights) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(secondMoment(k) / (r * r / 4) - 1)).toBeLessThan(1e-5);
  });
  it("limb-darkened disc: second moment (R²/2) Σ A_k(1/(k+2) − 1/(k+4)) / Σ A_k/(k+2) (analytic from the polynomial)", () => {
    for (const w of [420, 559.95, 700]) {
      const a = limbDarkeningCoefficients(w);
      let num = 0;
      let den = 0;
      a.forEach((ak, kk) => {
        num += ak * (1 / (kk + 2) - 1 / (kk + 4));
        den += ak / (kk + 2);
      });
      const k = sunDiscKernel(d, step, w);
      expect(Math.abs(sumOf(k.weights) - 1)).toBeLessThan(1e-12);
      expect(Math.abs(secondMoment(k) / ((r * r * num) / (2 * den)) - 1)).toBeLessThan(1e-5);
      // Limb darkening concentrates light towards the centre: narrower than the uniform disc.
      expect(secondMoment(k)).toBeLessThan((r * r) / 4);
    }
  });
  it("is symmetric and bounded by the disc; a point source and a step wider than the disc give the identity", () => {
    const k = sunDiscKernel(d, 0.01);
    const n = k.weights.length;
    for (let i = 0; i < n; i++) expect(k.weights[i]).toBeCloseTo(k.weights[n - 1 - i], 14);
    expect(k.offsetsDeg[n - 1] - 0.005).toBeLessThan(r);
    expect(Array.from(sunDiscKernel(0, 0.01).weights)).toEqual([1]);
    expect(Array.from(sunDiscKernel(d, 1).weights)).toEqual([1]);
  });
  it("convolution: identity for a point source, flat stays flat at the ends, a spike becomes the kernel", () => {
    const profile = Float64Array.from({ length: 200 }, (_, i) => Math.sin(i / 7) + 2);
    expect(Array.from(convolveProfile(profile, sunDiscKernel(0, 0.01)))).toEqual(Array.from(profile));
    const k = sunDiscKernel(d, 0.01);
    for (const v of convolveProfile(new Float64Array(100).fill(3), k)) expect(v).toBeCloseTo(3, 13);
    const spike = new Float64Array(201);
    spike[100] = 1;
    const out = convolveProfile(spike, k);
    const half = (k.weights.length - 1) / 2;
    for (let j = 0; j < k.weights.length; j++) expect(out[100 - half + j]).toBeCloseTo(k.weights[j], 15);
  });
});
