import { describe, it, expect } from "vitest";
import { extinctionEfficiency, opticalThickness, curtainTransmittance, CURTAIN_WAVELENGTH_NM, EXTINCTION_LIMIT_X } from "../../../lib/bow/extinction.js";
import { latticeRadiusQuadrature } from "../../../lib/drops/lattice-quadrature.js";
import { dropMedium } from "../../../lib/water/drop-medium.js";
import { cieXyz1931TwoDeg } from "../../../lib/data/cie-xyz-1931-2deg.js";

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

  it("Q_ext of a 1 mm drop is 2 within 0.5 % (extinction paradox, van de Hulst 1957 §8.22)", () => {
    // x = 2π·1000/0.555 ≈ 11 300; the excess over 2 falls like x^(−2/3) (the edge term of Nussenzveig & Wiscombe 1980,
    // Phys. Rev. Lett. 45, 1490), about 0.2 % here. m = 1.3335 is about water's index at 555 nm; the limit does not depend on it.
    const q = extinctionEfficiency(1.3335, 0, (2 * Math.PI * 1000) / 0.555);
    expect(Math.abs(q - 2)).toBeLessThan(0.01);
  });

  it("Marshall–Palmer 2 mm/h over 1 km: τ = s·Q·(π/4)·N0·2/Λ³ within 2 %", () => {
    // Marshall & Palmer 1948: N(D) = N0 e^(−ΛD), N0 = 8000 m⁻³ mm⁻¹, Λ = 4.1 R^(−0.21) mm⁻¹; ∫ D² e^(−ΛD) dD = 2/Λ³.
    // R = 2: Λ = 3.544 mm⁻¹, cross-section (π/4)·8000·2/Λ³ = 282.2 mm² m⁻³; with Q = 2 and s = 1000 m, τ = 0.564.
    // 2 %: Q_ext of the smallest drops exceeds 2 by a few per cent, and the quadrature drops 1e-4 tails.
    const lambda = 4.1 * 2 ** -0.21;
    const expected = 1000 * 2 * (Math.PI / 4) * 8000 * (2 / lambda ** 3) * 1e-6;
    expect(expected).toBeCloseTo(0.564, 3);
    const q = latticeRadiusQuadrature({ kind: "marshall-palmer", rainRateMmPerH: 2 });
    const tau = opticalThickness(q.radiiUm, q.weights, { wavelengthNm: 555, mRe: 1.3335, mIm: 0, nAir: 1 }, 1000);
    expect(Math.abs(tau / expected - 1)).toBeLessThan(0.02);
  });

  it("the curtain's wavelength is the peak of V(λ) = ȳ(λ): 555 nm in CIE 018:2019 Table 6 (the 1931 observer, 1 nm steps)", () => {
    const { startNm, stepNm, columns } = cieXyz1931TwoDeg;
    let peak = 0;
    for (let i = 1; i < columns.yBar.length; i++) if (columns.yBar[i] > columns.yBar[peak]) peak = i;
    expect(startNm + peak * stepNm).toBe(CURTAIN_WAVELENGTH_NM);
    expect(columns.yBar[peak]).toBe(1);
  });

  it("curtain: T = exp(−τ) with τ at 555 nm in the drops' water, and the drops' Q_ext range", () => {
    const q = latticeRadiusQuadrature({ kind: "marshall-palmer", rainRateMmPerH: 2 });
    const water = { temperatureC: 15, salinityPsu: 0 };
    const curtain = curtainTransmittance(q, water, 1000);
    expect(curtain.wavelengthNm).toBe(555);
    expect(curtain.opticalDepth).toBe(opticalThickness(q.radiiUm, q.weights, dropMedium(water, 555), 1000));
    expect(curtain.transmittance).toBe(Math.exp(-curtain.opticalDepth));
    // Q_ext of rain drops lies between the large-drop limit 2 and a few per cent above it (as the Marshall–Palmer check above).
    expect(curtain.qExtRange[0]).toBeGreaterThanOrEqual(1.99);
    expect(curtain.qExtRange[1]).toBeLessThan(2.2);
  });

  it("curtain without drops: clear (T = 1) and no Q_ext range", () => {
    const curtain = curtainTransmittance({ radiiUm: new Float64Array(0), weights: new Float64Array(0) }, { temperatureC: 15, salinityPsu: 0 }, 1000);
    expect(curtain).toEqual({ opticalDepth: 0, transmittance: 1, qExtRange: [], wavelengthNm: 555 });
  });
});
