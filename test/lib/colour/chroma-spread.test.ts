import { describe, it, expect } from "vitest";
import { chromaSpread } from "../../../lib/colour/chroma-spread.js";

// u′v′ per CIE 015:2018 eq. 8.12–8.13: equal-energy white E (X = Y = Z) sits at u′ = 4/19, v′ = 9/19.
describe("chromaSpread", () => {
  it("is zero for samples of one chromaticity, whatever their luminance", () => {
    expect(chromaSpread([[1, 1, 1], [5, 5, 5], [0.2, 0.2, 0.2]])).toBeLessThan(1e-15);
  });

  it("is the u′v′ distance from the luminance-weighted mean", () => {
    // Two equally bright samples (Y = 1), so the mean is their midpoint.
    const a = [1, 1, 1]; // u′ 4/19, v′ 9/19
    const b = [2, 1, 0]; // u′ 8/17, v′ 9/17
    const ua = 4 / 19, va = 9 / 19, ub = 8 / 17, vb = 9 / 17;
    const half = Math.hypot(ub - ua, vb - va) / 2;
    expect(chromaSpread([a, b])).toBeCloseTo(half, 14);
  });

  it("leaves out samples darker than a hundredth of the peak", () => {
    expect(chromaSpread([[1, 1, 1], [0, 0.005, 0]])).toBeCloseTo(0, 2);
  });
});
