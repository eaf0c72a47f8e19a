import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import {
  equilibriumOutline,
  equilibriumShapeCoefficients,
  SHAPE_TABLE_DIAMETERS_MM,
} from "../../../lib/drops/shape/equilibrium-shape.js";
import { outlineAxisRatio, outlineVolumeRatio, spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { cantingNodes } from "../../../lib/drops/shape/canting.js";

const table = JSON.parse(readFileSync(new URL("../../../fixtures/drop-shapes/beard-chuang-1987-axis-ratios.json", import.meta.url), "utf8")) as {
  diameterMm: number[];
  axisRatio: number[];
};

describe("Beard & Chuang (1987) equilibrium raindrop shapes", () => {
  it.each(table.diameterMm.filter((d) => d <= 6).map((d, i) => [d, table.axisRatio[i]]))(
    "D = %s mm: the outline's axis ratio matches Beard & Chuang's Table 1 (%s) within 0.01",
    (diameterMm, published) => {
      // 0.01: the coefficients are Chuang & Beard's (1990) 4-decimal table of the same model; Beard & Chuang
      // state their shapes' axis ratios to about 1 %. Measured worst: 0.009 at 4 mm.
      expect(Math.abs(outlineAxisRatio(equilibriumOutline(diameterMm * 500)) - published)).toBeLessThanOrEqual(0.01);
    },
  );

  it("every tabulated shape keeps the volume of its equal-volume sphere (a check of the coefficients' signs)", () => {
    // Four-decimal coefficients: the volume is fixed to ~1e-4·(number of terms); measured ≤ 4e-4 up to 7 mm.
    for (const d of SHAPE_TABLE_DIAMETERS_MM.filter((v) => v <= 7)) {
      expect(Math.abs(outlineVolumeRatio(equilibriumOutline(d * 500)) - 1)).toBeLessThanOrEqual(5e-4);
    }
  });

  it("the base (θ = 0, downward) flattens and the summit rounds as drops grow, as Beard & Chuang describe", () => {
    // Curvature of the outline at a pole, (r − r″)/r² for r′ = 0 (polar curve curvature, common practice).
    const poleCurvature = (diameterMm: number, theta: number) => {
      const o = equilibriumOutline(diameterMm * 500);
      const h = 1e-3;
      const r = (t: number) => o.radius(Math.cos(t));
      const r2 = (r(theta + h) - 2 * r(theta) + r(theta - h)) / (h * h);
      return (r(theta) - r2) / r(theta) ** 2;
    };
    expect(poleCurvature(8, 0)).toBeLessThan(poleCurvature(4, 0));
    expect(poleCurvature(8, Math.PI)).toBeGreaterThan(poleCurvature(4, Math.PI));
  });

  // The ray tracer finds one exit per chord, which holds for convex outlines. At 6 mm (the largest radius the
  // quadrature keeps, 3 mm) a ring near the summit is flat within curvature −0.01; from 6.5 mm it is concave.
  it.each([
    [5.5, 0],
    [6, -0.01],
  ])("shapes up to %s mm have outline curvature above %s everywhere", (maxDiameterMm, floor) => {
    for (const d of SHAPE_TABLE_DIAMETERS_MM.filter((v) => v <= maxDiameterMm)) {
      const o = equilibriumOutline(d * 500);
      const r = (t: number) => o.radius(Math.cos(t));
      const h = 1e-3;
      for (let s = 1; s < 1800; s++) {
        const t = (Math.PI * s) / 1800;
        const r1 = (r(t + h) - r(t - h)) / (2 * h);
        const r2 = (r(t + h) - 2 * r(t) + r(t - h)) / (h * h);
        // Polar curve: curvature ∝ r² + 2r′² − r·r″ (common practice).
        expect(r(t) ** 2 + 2 * r1 * r1 - r(t) * r2).toBeGreaterThan(floor);
      }
    }
  });

  it("up to 1.24 mm diameter the flattening follows Pruppacher & Pitter's (1971) measured axis ratios within 0.0025", () => {
    const small = JSON.parse(readFileSync(new URL("../../../fixtures/drop-shapes/pruppacher-pitter-1971-axis-ratios.json", import.meta.url), "utf8")) as {
      radiusMm: number[];
      axisRatio: number[];
    };
    // 0.0025: the spread of their wind-tunnel photographs' axis ratios (from memory); measured worst 0.0016 (0.62 mm).
    small.radiusMm.forEach((r, i) => {
      expect(Math.abs(outlineAxisRatio(equilibriumOutline(r * 1000)) - small.axisRatio[i])).toBeLessThanOrEqual(0.0025);
    });
  });

  it("small drops are spheres in the limit; the coefficients grow as D³ below 1 mm", () => {
    const c1 = equilibriumShapeCoefficients(1);
    const cHalf = equilibriumShapeCoefficients(0.5);
    cHalf.forEach((c, n) => expect(c).toBeCloseTo(c1[n] / 8, 12));
    expect(outlineAxisRatio(equilibriumOutline(100))).toBeGreaterThan(0.999);
    expect(() => equilibriumShapeCoefficients(9.5)).toThrow(RangeError);
  });

  it("a spheroid outline has the axis ratio asked for and unit volume", () => {
    for (const q of [1, 0.9, 0.7, 0.5]) {
      const o = spheroidOutline(q);
      expect(outlineAxisRatio(o)).toBeCloseTo(q, 6);
      expect(outlineVolumeRatio(o)).toBeCloseTo(1, 6);
    }
  });

  it("the tracer's one-pass terms r, dr/dμ, d²r/dμ² equal radius, radiusSlope and a central difference of it (Press et al. 2007 Eq. 5.7.7), within 1e-7", () => {
    // h = 1e-5: the central difference's truncation error, ~h²·r⁗ with r⁗ ≲ 10³ for 11 cosine terms, stays below 1e-7.
    const h = 1e-5;
    for (const outline of [equilibriumOutline(1250), equilibriumOutline(2500), spheroidOutline(0.7)]) {
      const three = new Float64Array(3);
      const two = new Float64Array(2);
      for (const mu of [-0.97, -0.5, 0, 0.3, 0.8, 0.99]) {
        outline.radiusTerms(mu, three);
        outline.radiusAndSlope(mu, two);
        expect(Math.abs(three[0] - outline.radius(mu))).toBeLessThan(1e-14);
        expect(Math.abs(three[1] - outline.radiusSlope(mu))).toBeLessThan(1e-13);
        expect(Math.abs(two[0] - three[0]) + Math.abs(two[1] - three[1])).toBeLessThan(1e-14);
        const curvature = (outline.radiusSlope(mu + h) - outline.radiusSlope(mu - h)) / (2 * h);
        expect(Math.abs(three[2] - curvature)).toBeLessThan(1e-7);
      }
    }
  });

  it("canting nodes: weights sum to 1 and reproduce the variance σ² in each plane (Gauss–Hermite)", () => {
    const nodes = cantingNodes(7.5);
    expect(nodes.reduce((s, n) => s + n.weight, 0)).toBeCloseTo(1, 14);
    expect(nodes.reduce((s, n) => s + n.weight * n.tiltXDeg ** 2, 0)).toBeCloseTo(7.5 ** 2, 10);
    expect(nodes.reduce((s, n) => s + n.weight * n.tiltXDeg ** 4, 0)).toBeCloseTo(3 * 7.5 ** 4, 6);
    expect(cantingNodes(0)).toEqual([{ tiltXDeg: 0, tiltYDeg: 0, weight: 1 }]);
  });
});
