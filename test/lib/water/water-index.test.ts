import { describe, expect, it } from "vitest";
import { standardAirIndex } from "../../../lib/water/air-index.js";
import { iapwsRefractiveIndex } from "../../../lib/water/iapws-r9-97.js";
import { liquidWaterDensityKgPerM3 } from "../../../lib/water/liquid-density.js";
import { quanFryIndexRelativeToAir } from "../../../lib/water/quan-fry-1995.js";
import { waterIndex } from "../../../lib/water/water-index.js";

// Tolerance for a value printed with d decimals: 0.6 unit of the last printed digit (rounding is ±0.5 unit).
const printed = (decimals: number) => 0.6 * 10 ** -decimals;

describe("IAPWS R9-97 refractive index", () => {
  // IAPWS R9-97 Table 3 (as carried in public IAPWS implementations' tests), with ρ from IAPWS-95 (docs/checks.md).
  const table3: [number, number, number, string][] = [
    [273.15, 999.842411, 0.2265, "1.394527"],
    [273.15, 999.842411, 0.589, "1.334344"],
    [273.15, 999.842411, 1.01398, "1.326135"],
    [273.15, 1004.821444, 0.2265, "1.396526"],
    [273.15, 1004.821444, 1.01398, "1.327710"],
    [373.15, 958.770656, 0.2265, "1.375622"],
    [373.15, 999.761789, 0.2265, "1.391983"],
    [473.15, 0.460314, 0.589, "1.0001456"],
    [473.15, 923.740172, 1.01398, "1.298369"],
    [773.15, 2.82396, 0.589, "1.0008773"],
  ];
  it.each(table3)("Table 3: T = %s K, ρ = %s kg/m³, λ = %s µm → n = %s", (t, rho, lambdaUm, expected) => {
    const decimals = expected.split(".")[1].length;
    const n = iapwsRefractiveIndex(lambdaUm * 1000, t, rho);
    expect(Math.abs(n - Number(expected))).toBeLessThanOrEqual(printed(decimals));
  });

  // Direct formula checks published in a public IAPWS implementation's documentation.
  it("direct checks: 1.39277824 (ρ 997.047435, 298.15 K, 0.2265 µm) and 1.00949307 (ρ 30.4758534, 773.15 K, 0.5893 µm)", () => {
    expect(Math.abs(iapwsRefractiveIndex(226.5, 298.15, 997.047435) - 1.39277824)).toBeLessThanOrEqual(printed(8));
    expect(Math.abs(iapwsRefractiveIndex(589.3, 773.15, 30.4758534) - 1.00949307)).toBeLessThanOrEqual(printed(8));
  });
});

describe("Kell 1975 liquid density", () => {
  // IAPWS-95 densities at 0.101325 MPa (Wagner & Pruß 2002; computed, docs/checks.md). Kell's correlation sits ≈ 3e-3 kg/m³ below them
  // throughout (his absolute density scale predates the current one); 5e-3 kg/m³ (5 ppm) covers that and shifts n
  // by < 2e-6, below R9-97's own uncertainty.
  it.each([
    [0, 999.84309],
    [10, 999.70247],
    [20, 998.20715],
    [25, 997.04764],
  ])("%s °C → %s kg/m³ within 5e-3", (tC, rho) => {
    expect(Math.abs(liquidWaterDensityKgPerM3(tC) - rho)).toBeLessThanOrEqual(5e-3);
  });

  // Supercooled −10 °C: 998.117 kg/m³ (as public density tables list it; their primary source not checked;
  // IAPWS G12-15 is the formulation for supercooled water); Kell's rational form stays within 0.01.
  it("extrapolates to supercooled −10 °C", () => {
    expect(Math.abs(liquidWaterDensityKgPerM3(-10) - 998.117)).toBeLessThanOrEqual(0.01);
  });
});

describe("Ciddor 1996 standard dry air", () => {
  // n = 1.00027717 at 587.6 nm: refractiveindex.info's Ciddor 1996 page, as quoted in a public optics library's test.
  it("n_air(587.6 nm) = 1.00027717", () => {
    expect(Math.abs(standardAirIndex(587.6) - 1.00027717)).toBeLessThanOrEqual(printed(8));
  });
  it("n_air − 1 ≈ 2.77e-4 at 589 nm (common practice)", () => {
    expect(standardAirIndex(589) - 1).toBeCloseTo(2.77e-4, 6);
  });
});

describe("comparison at 20 °C (computed with R9-97 at ρ = 998.20715 and Quan & Fry 1995: docs/checks.md)", () => {
  const rows: [number, number, number, number][] = [
    [380, 1.345625, 1.345307, 1.352086],
    [400, 1.34356, 1.343211, 1.349938],
    [450, 1.339608, 1.339247, 1.345861],
    [500, 1.336795, 1.336445, 1.342969],
    [550, 1.334683, 1.334338, 1.340789],
    [589.3, 1.333349, 1.333004, 1.339406],
    [600, 1.333024, 1.332679, 1.339068],
    [650, 1.331668, 1.331324, 1.337661],
    [700, 1.330519, 1.330187, 1.33648],
    [780, 1.328961, 1.328688, 1.334922],
  ];
  // R9-97 column: printed 6 decimals (±6e-7) plus the Kell–IAPWS-95 density offset (≈ 1.0e-6 in n) → 2e-6.
  it.each(rows)("λ = %s nm: waterIndex n within 2e-6 of R9-97 %s", (lambda, r997) => {
    const { n, k } = waterIndex({ wavelengthNm: lambda, temperatureC: 20, salinityPsu: 0 });
    expect(Math.abs(n - r997)).toBeLessThanOrEqual(2e-6);
    expect(k).toBe(0);
  });
  // Quan & Fry columns: printed 6 decimals → 1e-6.
  it.each(rows)("λ = %s nm: Quan–Fry S = 0 / 35 ‰ within 1e-6", (lambda, _r, qf0, qf35) => {
    expect(Math.abs(quanFryIndexRelativeToAir(lambda, 20, 0) - qf0)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(quanFryIndexRelativeToAir(lambda, 20, 35) - qf35)).toBeLessThanOrEqual(1e-6);
  });
});

describe("waterIndex", () => {
  it("sea water = pure IAPWS value + Quan–Fry salinity increment; continuous at S = 0", () => {
    const fresh = waterIndex({ wavelengthNm: 550, temperatureC: 15, salinityPsu: 0 });
    const nearlyFresh = waterIndex({ wavelengthNm: 550, temperatureC: 15, salinityPsu: 1e-9 });
    expect(Math.abs(nearlyFresh.n - fresh.n)).toBeLessThan(1e-12);
    const sea = waterIndex({ wavelengthNm: 550, temperatureC: 15, salinityPsu: 35 });
    // Quan & Fry 1995 formula by hand: (n1 + n2 T + n3 T²)S + n6 S/λ = 5.80125e-3 + 7.35e-4 = 6.53625e-3 at 550 nm,
    // 15 °C, 35 ‰, times n_air ≈ 1.000277; 1e-6 allows for λ in air vs vacuum (changes n6 S/λ by 2e-7).
    expect(Math.abs(sea.n - fresh.n - 6.53625e-3 * 1.000277)).toBeLessThan(1e-6);
    expect(sea.source).toContain("Quan & Fry");
    expect(sea.source).toContain("k = 0: absorption neglected");
  });
  it("relative-to-air index divides by Ciddor's n_air", () => {
    const w = waterIndex({ wavelengthNm: 589.3, temperatureC: 20, salinityPsu: 0 });
    expect(w.nRelativeToAir).toBeCloseTo(w.n / standardAirIndex(589.3), 15);
    // Quan & Fry 1995 is itself relative to air; the R9-97 value divided by n_air must fall within 5e-5 of it
    // (the two independent fits differ by ≈ 3e-5 at 400–700 nm, computed after dividing by n_air).
    expect(Math.abs(w.nRelativeToAir - quanFryIndexRelativeToAir(589.3, 20, 0))).toBeLessThan(5e-5);
  });
  // R9-97 is valid down to −12 °C (release text); the liquid index changes by well under 1e-3 per 10 K near 0 °C
  // (R9-97 Table 3 at 0 °C against the 20 °C values), so a supercooled drop must land within 1e-3 of the 0 °C value.
  it("supercooled drops at −10 °C get an index within 1e-3 of the 0 °C value", () => {
    const cold = waterIndex({ wavelengthNm: 589.3, temperatureC: -10, salinityPsu: 0 }).n;
    const zero = waterIndex({ wavelengthNm: 589.3, temperatureC: 0, salinityPsu: 0 }).n;
    expect(Number.isFinite(cold)).toBe(true);
    expect(Math.abs(cold - zero)).toBeLessThan(1e-3);
  });
  it("rejects inputs outside the models' ranges", () => {
    expect(() => waterIndex({ wavelengthNm: 150, temperatureC: 20, salinityPsu: 0 })).toThrow(RangeError);
    expect(() => waterIndex({ wavelengthNm: 380, temperatureC: 20, salinityPsu: 10 })).toThrow(RangeError);
    expect(() => waterIndex({ wavelengthNm: 550, temperatureC: 20, salinityPsu: 40 })).toThrow(RangeError);
    expect(() => waterIndex({ wavelengthNm: 550, temperatureC: -20, salinityPsu: 0 })).toThrow(RangeError);
  });
});
