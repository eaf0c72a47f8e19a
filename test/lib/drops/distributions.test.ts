import { describe, it, expect } from "vitest";
import {
  type DropSizeDistribution, fractionOfCrossSectionAbove, gammaFunction, liquidWaterContentGPerM3, marshallPalmerSlopePerMm,
  meanSquaredRadiusUm2, numberDensityPerUm, radiusMoment, radiusQuadrature, reflectivityFactorMm6PerM3, totalNumberPerM3,
} from "../../../lib/drops/index.js";

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe("Marshall & Palmer 1948 (J. Meteorol. 5, 165; computed from N0 = 8000 m⁻³ mm⁻¹, Λ = 4.1 R^−0.21)", () => {
  it("Λ at R = 1, 5, 10, 25 mm/h = 4.1000, 2.9242, 2.5280, 2.0855 mm⁻¹ (4 decimals → 5e-5)", () => {
    [[1, 4.1], [5, 2.9242], [10, 2.528], [25, 2.0855]].forEach(([r, l]) => expect(Math.abs(marshallPalmerSlopePerMm(r) - l)).toBeLessThan(5e-5));
  });
  it("total number N0/Λ = 1951.2 (R = 1) and 3164.5 m⁻³ (R = 10) (1 decimal → 0.05)", () => {
    expect(Math.abs(totalNumberPerM3({ kind: "marshall-palmer", rainRateMmPerH: 1 }) - 1951.2)).toBeLessThan(0.05);
    expect(Math.abs(totalNumberPerM3({ kind: "marshall-palmer", rainRateMmPerH: 10 }) - 3164.5)).toBeLessThan(0.05);
  });
  it("median volume diameter D0 = 3.67/Λ: 0.895 mm (R = 1), 1.452 mm (R = 10); the exact median of D³N(D) is 3.672/Λ", () => {
    expect(Math.abs(3.67 / marshallPalmerSlopePerMm(1) - 0.895)).toBeLessThan(5e-4);
    expect(Math.abs(3.67 / marshallPalmerSlopePerMm(10) - 1.452)).toBeLessThan(5e-4);
    // Half the volume lies above D0 = 3.672/Λ: Γ(4, x)/Γ(4) = e^−x(1 + x + x²/2 + x³/6) = 0.5 at x = 3.672 (the regularised upper incomplete gamma function at integer order, DLMF §8.4).
    const x = 3.672;
    expect(Math.abs(Math.exp(-x) * (1 + x + (x * x) / 2 + x ** 3 / 6) - 0.5)).toBeLessThan(2e-4);
  });
  it("W = 0.0889 R^0.84 g m⁻³ and Z = 295.8 R^1.47 mm⁶ m⁻³ (computed; 4 significant digits → 6e-4 relative)", () => {
    for (const r of [1, 5, 10, 50]) {
      const mp = { kind: "marshall-palmer", rainRateMmPerH: r } as const;
      expect(rel(liquidWaterContentGPerM3(mp), 0.0889 * r ** 0.84)).toBeLessThan(6e-4);
      expect(rel(reflectivityFactorMm6PerM3(mp), 295.8 * r ** 1.47)).toBeLessThan(6e-4);
    }
  });
  it("n(r) = 2·N(D = 2r) per mm of radius, in m⁻³ µm⁻¹", () => {
    const l = marshallPalmerSlopePerMm(10);
    expect(numberDensityPerUm({ kind: "marshall-palmer", rainRateMmPerH: 10 }, 500)).toBeCloseTo(2e-3 * 8000 * Math.exp(-l * 1), 12);
  });
  it("share of cross-section above r = 1 mm equals Γ(3, 2Λ)/Γ(3) = e^−x(1 + x + x²/2), x = 2Λ (1e-5)", () => {
    for (const r of [1, 10, 50]) {
      const x = 2 * marshallPalmerSlopePerMm(r);
      const f = fractionOfCrossSectionAbove({ kind: "marshall-palmer", rainRateMmPerH: r }, 1000);
      expect(Math.abs(f - Math.exp(-x) * (1 + x + (x * x) / 2))).toBeLessThan(1e-5);
    }
  });
});

describe("gamma and lognormal laws", () => {
  it("gamma by D0 and μ (Ulbrich 1983: Λ D0 = 3.67 + μ) carries the requested total number", () => {
    const g: DropSizeDistribution = { kind: "gamma-d0", medianVolumeDiameterMm: 1.2, mu: 2.5, totalNumberPerM3: 1000 };
    expect(totalNumberPerM3(g)).toBeCloseTo(1000, 9);
    // Mean diameter of a gamma law is (μ + 1)/Λ (Euler's integral).
    const lambda = (3.67 + 2.5) / 1.2;
    expect(rel(radiusMoment(g, 1) / 500 / 1000, 3.5 / lambda)).toBeLessThan(1e-12);
  });
  it("Lanczos Γ against exact values Γ(5) = 24, Γ(1/2) = √π, Γ(7.5) (1e-13 relative)", () => {
    expect(rel(gammaFunction(5), 24)).toBeLessThan(1e-13);
    expect(rel(gammaFunction(0.5), Math.sqrt(Math.PI))).toBeLessThan(1e-13);
    // Γ(7.5) = (13!!/2^7) √π.
    expect(rel(gammaFunction(7.5), (135135 / 128) * Math.sqrt(Math.PI))).toBeLessThan(1e-13);
  });
  it("lognormal: ⟨r^k⟩ = r_m^k exp(k² ln²σg/2) (analytic), checked by brute-force integration", () => {
    const ln: DropSizeDistribution = { kind: "lognormal", medianRadiusUm: 8, geometricSd: 1.5, totalNumberPerM3: 1e8 };
    for (const k of [0, 1, 2, 3]) {
      let s = 0;
      const n = 20000;
      const h = Math.log(1e4) / n;
      for (let i = 0; i <= n; i++) {
        const r = 0.08 * Math.exp(i * h);
        s += (i === 0 || i === n ? 0.5 : 1) * r ** (k + 1) * numberDensityPerUm(ln, r) * h;
      }
      expect(rel(s, radiusMoment(ln, k))).toBeLessThan(1e-10);
      expect(rel(radiusMoment(ln, k), 1e8 * 8 ** k * Math.exp(0.5 * k * k * Math.log(1.5) ** 2))).toBeLessThan(1e-13);
    }
    expect(rel(meanSquaredRadiusUm2(ln), 64 * Math.exp(2 * Math.log(1.5) ** 2))).toBeLessThan(1e-13);
  });
});

describe("radius quadrature integrates moments within 1e-3", () => {
  const kinds: [string, DropSizeDistribution][] = [
    ["Marshall–Palmer 1 mm/h", { kind: "marshall-palmer", rainRateMmPerH: 1 }],
    ["Marshall–Palmer 10 mm/h", { kind: "marshall-palmer", rainRateMmPerH: 10 }],
    ["gamma μ = 3", { kind: "gamma", n0: 5e4, mu: 3, lambdaPerMm: 6 }],
    ["gamma by D0", { kind: "gamma-d0", medianVolumeDiameterMm: 0.4, mu: 1, totalNumberPerM3: 5000 }],
    ["lognormal fog", { kind: "lognormal", medianRadiusUm: 6, geometricSd: 1.4, totalNumberPerM3: 2e8 }],
    ["histogram", { kind: "histogram", edgesUm: [100, 200, 400, 800, 1600], numberPerM3: [500, 300, 100, 5] }],
    ["monodisperse", { kind: "monodisperse", radiusUm: 250, totalNumberPerM3: 400 }],
  ];
  const sumMoment = (q: { radiiUm: Float64Array; weights: Float64Array }, k: number) =>
    q.weights.reduce((s, w, i) => s + w * q.radiiUm[i] ** k, 0);
  for (const [name, dist] of kinds) {
    it(`${name}: r², r³ with the default bounds; r⁰ when the bounds also cover the number`, () => {
      const q = radiusQuadrature(dist);
      expect(q.cappedAtMaxRadius).toBe(false);
      for (const k of [2, 3]) expect(rel(sumMoment(q, k), radiusMoment(dist, k)), `k = ${k}`).toBeLessThan(1e-3);
      const q0 = radiusQuadrature(dist, { coverMoments: [0, 2, 3] });
      for (const k of [0, 2, 3]) expect(rel(sumMoment(q0, k), radiusMoment(dist, k)), `k = ${k}`).toBeLessThan(1e-3);
    });
  }
  it("histogram: number and cross-section are exact (nodes at each piece's rms radius), 1e-12", () => {
    const h: DropSizeDistribution = { kind: "histogram", edgesUm: [100, 200, 400, 800, 1600], numberPerM3: [500, 300, 100, 5] };
    const q = radiusQuadrature(h, { nodesPerDecade: 8 });
    for (const k of [0, 2]) expect(rel(sumMoment(q, k), radiusMoment(h, k))).toBeLessThan(1e-12);
  });
  it("nodes are log-spaced at the requested density; heavy rain is capped at 3000 µm and says so", () => {
    const q = radiusQuadrature({ kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.3, totalNumberPerM3: 1 }, { nodesPerDecade: 50 });
    const ratio = q.radiiUm[1] / q.radiiUm[0];
    expect(Math.log10(ratio)).toBeLessThanOrEqual(1 / 50 + 1e-12);
    expect(q.radiiUm[q.radiiUm.length - 1] / q.radiiUm[q.radiiUm.length - 2]).toBeCloseTo(ratio, 12);
    const heavy = radiusQuadrature({ kind: "marshall-palmer", rainRateMmPerH: 100 });
    expect(heavy.cappedAtMaxRadius).toBe(true);
    expect(heavy.upperUm).toBe(3000);
    const x = 2 * 3 * marshallPalmerSlopePerMm(100);
    expect(Math.abs(heavy.crossSectionFractionAboveCap - Math.exp(-x) * (1 + x + (x * x) / 2))).toBeLessThan(1e-5);
  });
  it("flags large-drop weight for the flattening warning: monodisperse and histogram shares are exact", () => {
    expect(fractionOfCrossSectionAbove({ kind: "monodisperse", radiusUm: 1500, totalNumberPerM3: 1 }, 1000)).toBe(1);
    const h: DropSizeDistribution = { kind: "histogram", edgesUm: [500, 1000, 2000], numberPerM3: [10, 10] };
    // Bin densities 10/500 and 10/1000 per µm; ∫ r² over each bin is (b³ − a³)/3.
    const lower = (10 / 500) * (1000 ** 3 - 500 ** 3);
    const upper = (10 / 1000) * (2000 ** 3 - 1000 ** 3);
    expect(fractionOfCrossSectionAbove(h, 1000)).toBeCloseTo(upper / (lower + upper), 14);
  });
});
