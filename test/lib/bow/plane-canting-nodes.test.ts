import { describe, expect, it } from "vitest";
import { placeCantingRule, planeCantingNodes } from "../../../lib/bow/plane-canting-nodes.js";
import { shapedPlaneContext, shapedPlaneRow } from "../../../lib/bow/shaped-plane-rows.js";
import { cantingNodesFive } from "../../../lib/drops/shape/canting.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";

describe("canting nodes of one place on the bow", () => {
  const sd = 7.5;

  it("merge the two nodes tilted across a vertical scattering plane (top and foot of the bow), keeping the spread's moments", () => {
    for (const arcPositionDeg of [0, 180]) {
      const nodes = planeCantingNodes({ cantingSdDeg: sd, sunElevationDeg: 20, arcPositionDeg });
      expect(nodes.length).toBe(4);
      // The merged node carries both weights, so the rule keeps the Gaussian's moments: Σw = 1, Σw·tilt² = σ² in each
      // plane of tilt (normal density, Abramowitz & Stegun 1964 Eq. 26.1.26 moments), and ⟨tiltY⟩ = 0 by the mirror.
      expect(nodes.reduce((s, n) => s + n.weight, 0)).toBeCloseTo(1, 14);
      expect(nodes.reduce((s, n) => s + n.weight * n.tiltXDeg ** 2, 0)).toBeCloseTo(sd * sd, 10);
      expect(nodes.reduce((s, n) => s + n.weight * n.tiltYDeg ** 2, 0)).toBeCloseTo(sd * sd, 10);
      expect(nodes.reduce((s, n) => s + n.weight * n.tiltXDeg, 0)).toBeCloseTo(0, 12);
    }
  });

  it("merge the banded rule's nodes across the plane in mirror pairs (large drops at the top and foot of the bow)", () => {
    for (const arcPositionDeg of [0, 180]) {
      const place = { cantingSdDeg: sd, sunElevationDeg: 20, arcPositionDeg, cantingBand: true };
      const rule = placeCantingRule(place);
      const nodes = planeCantingNodes(place);
      expect(rule.banded).not.toBeNull();
      expect(nodes.length).toBe(rule.nodes.length / 2);
      // Σw = 1, Σw·tilt² = σ² in the sun's plane (the 3-point Gauss–Hermite rule's, exact; normal density, Abramowitz
      // & Stegun 1964 Eq. 26.1.26 moments), ⟨tiltX⟩ = 0. Across, the cells' centroids give 52.4 of σ² = 56.25 (the outer
      // cells' spread is in their kernels, lib/bow/canting-band-spread.ts).
      expect(nodes.reduce((s, n) => s + n.weight, 0)).toBeCloseTo(1, 10);
      expect(nodes.reduce((s, n) => s + n.weight * n.tiltXDeg ** 2, 0)).toBeCloseTo(sd * sd, 8);
      expect(nodes.reduce((s, n) => s + n.weight * n.tiltXDeg, 0)).toBeCloseTo(0, 12);
      expect(nodes.reduce((s, n) => s + n.weight * n.tiltYDeg ** 2, 0) / (sd * sd)).toBeGreaterThan(0.9);
    }
  });

  it("stay the five nodes where the plane holds no mirror pair (the side and between), and one node without canting", () => {
    for (const [sunElevationDeg, arcPositionDeg] of [[10, 45], [0, 90], [10, 90], [30, 120]]) {
      expect(planeCantingNodes({ cantingSdDeg: sd, sunElevationDeg, arcPositionDeg })).toEqual(cantingNodesFive(sd));
    }
    expect(planeCantingNodes({ cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 0 })).toEqual(cantingNodesFive(0));
  });

  it("pair drops that scatter the same light into the plane: traced separately, mirror images give the same row", () => {
    // The claim the merge rests on, checked by tracing both drops (1 mm equilibrium shape, top of the bow, sun 10°,
    // ψ 40–42°): rows equal to 1e-7 of their peak (measured: 1.1e-9, the searches' and cubic fills' tolerances; an unequal pair would differ by far more,
    // the tilt moving the bow's edge by tenths of a degree).
    const outline = equilibriumOutline(1000);
    const plane = bowScatteringPlane(10, 0);
    const thetaDeg = Float64Array.from({ length: 40 }, (_, j) => 138.025 + 0.05 * j);
    const tilt = Math.sqrt(3) * sd;
    const row = (tiltYDeg: number) => {
      const ctx = shapedPlaneContext({ outline, axis: cantedAxis(0, tiltYDeg), n: 1.3345 }, plane, 1, thetaDeg, 0.05);
      const perp = new Float64Array(thetaDeg.length);
      const par = new Float64Array(thetaDeg.length);
      shapedPlaneRow(ctx, 12000, perp, par);
      return { perp, par };
    };
    const [a, b] = [row(tilt), row(-tilt)];
    const peak = Math.max(...a.perp);
    expect(peak).toBeGreaterThan(0);
    for (let j = 0; j < thetaDeg.length; j++) {
      expect(Math.abs(a.perp[j] - b.perp[j])).toBeLessThan(1e-7 * peak);
      expect(Math.abs(a.par[j] - b.par[j])).toBeLessThan(1e-7 * peak);
    }
    // And a drop tilted in the plane is not its own twin's: the check can fail.
    const inPlane = shapedPlaneContext({ outline, axis: cantedAxis(tilt, 0), n: 1.3345 }, plane, 1, thetaDeg, 0.05);
    const perp = new Float64Array(thetaDeg.length);
    shapedPlaneRow(inPlane, 12000, perp, new Float64Array(thetaDeg.length));
    expect(Math.max(...perp.map((v, j) => Math.abs(v - a.perp[j])))).toBeGreaterThan(1e-3 * peak);
  }, 60_000);
});
