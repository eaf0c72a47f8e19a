import { describe, it, expect } from "vitest";
import { extinctionEfficiency, opticalThickness, EXTINCTION_LIMIT_X } from "../../../lib/bow/extinction.js";

describe("extinction by the rain curtain", () => {
  it("Q_ext tends to 2 for large drops (van de Hulst 1957 §8.22): within 1 % at the switch-over size", () => {
    const q = extinctionEfficiency(1.334, 0, EXTINCTION_LIMIT_X);
    expect(Math.abs(q - 2)).toBeLessThan(0.02);
    // Wiscombe 1979 case 10 (m = 1.33 + 1e-5 i, x = 100): Qext = 2.101321 (NCAR/TN-140+STR, MIEV0 test answers).
    expect(extinctionEfficiency(1.33, 1e-5, 100)).toBeCloseTo(2.101321, 5);
  });

  it("τ of 1000 drops/m³ of 1 mm over 1 km is 2 × geometric cross-section × N × s", () => {
    // Large-drop limit: τ = 2 π r² N s = 2π × 1e-6 m² × 1000 m⁻³ × 1000 m = 6.283 (Beer–Lambert).
    const tau = opticalThickness(Float64Array.of(1000), Float64Array.of(1000), { wavelengthNm: 550, mRe: 1.334, mIm: 0, nAir: 1.000277 }, 1000);
    expect(tau).toBeCloseTo(2 * Math.PI, 6);
  });
});
