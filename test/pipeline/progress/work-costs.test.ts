// The weights progress is counted in: how a flattened drop's row is priced, and how the benchmark flags a weight
// that its new measurement puts more than 2× away (stale) or out of proportion with the others.
import { describe, it, expect } from "vitest";
import { COST_NS, kernelRowCostNs, weightDrift } from "../../../pipeline/progress/work-costs.js";
import { INDEX_NODES, quantiseSpec } from "../../../lib/bow/shaped-rows.js";

describe("work costs", () => {
  it("prices a flattened drop's row per scattering plane (one per canting node), whatever its sphere engine", () => {
    const canted = quantiseSpec({ kind: "equilibrium", cantingSdDeg: 7, sunElevationDeg: 10, arcPositionDeg: 90, rayOnly: false });
    const upright = { ...canted, cantingSdDeg: 0 };
    // One wavelength alone: the INDEX_NODES traced planes are all its own, and its plane is interpolated from them.
    const plane = INDEX_NODES * COST_NS.shapedPlane + COST_NS.shapedInterpolatedPlane + 600 * COST_NS.shapedPlaneSample;
    expect(kernelRowCostNs("airy", 20000, 600, 1, upright)).toBeCloseTo(plane, 6);
    // 41 wavelengths share the traced planes.
    const shared = (INDEX_NODES * COST_NS.shapedPlane) / 41 + COST_NS.shapedInterpolatedPlane + 600 * COST_NS.shapedPlaneSample;
    expect(kernelRowCostNs("airy", 20000, 600, 1, upright, 41)).toBeCloseTo(shared, 6);
    // The five-point canting rule (lib/drops/shape/canting.ts): five planes.
    expect(kernelRowCostNs("mie", 20000, 600, 1, canted)).toBeCloseTo(5 * plane, 6);
    // The fixed part makes a short row cost more per sample than a long one.
    expect(kernelRowCostNs("airy", 20000, 100, 1, upright) / 100).toBeGreaterThan(kernelRowCostNs("airy", 20000, 1000, 1, upright) / 1000);
    // Spheres are priced by their engine.
    expect(kernelRowCostNs("airy", 20000, 600)).toBe(600 * COST_NS.airySample);
  });

  it("flags nothing when the measurements match the weights", () => {
    const drift = weightDrift({ ...COST_NS });
    expect(drift.length).toBe(Object.keys(COST_NS).length);
    expect(drift.every((d) => d.ratio === 1 && !d.stale && !d.uneven)).toBe(true);
  });

  it("on a machine 3× slower every weight is stale but none out of proportion", () => {
    const slow = Object.fromEntries(Object.entries(COST_NS).map(([k, v]) => [k, 3 * v]));
    const drift = weightDrift(slow);
    expect(drift.every((d) => d.stale && !d.uneven)).toBe(true);
    expect(drift[0].relative).toBeCloseTo(1, 12);
  });

  it("flags the one piece that moved 2.5× against the others, and not one that moved 1.9×", () => {
    const drift = weightDrift({ ...COST_NS, colourSample: 2.5 * COST_NS.colourSample, jsonAngle: COST_NS.jsonAngle / 1.9 });
    const colour = drift.find((d) => d.piece === "colourSample")!;
    const json = drift.find((d) => d.piece === "jsonAngle")!;
    expect(colour).toMatchObject({ stale: true, uneven: true });
    expect(colour.ratio).toBeCloseTo(2.5, 12);
    expect(json).toMatchObject({ stale: false, uneven: false });
    expect(drift.filter((d) => d.stale).map((d) => d.piece)).toEqual(["colourSample"]);
  });

  it("flags a piece measured at zero (a fit that found no cost) without letting it set the scale", () => {
    const drift = weightDrift({ ...COST_NS, shapedPlaneSample: 0 });
    expect(drift.find((d) => d.piece === "shapedPlaneSample")).toMatchObject({ ratio: 0, stale: true, uneven: true });
    expect(drift.filter((d) => d.stale).length).toBe(1);
  });
});
