import { describe, expect, it } from "vitest";
import { DEFAULT_DEFORMATION_STEP, planDropShapes, shapedCostTermAngles, shapedPlaneCounts } from "../../../pipeline/compute/drop-shape-plan.js";
import { INDEX_NODES, SHAPE_NODES_MAX_RADIUS_UM, shapedRowKey } from "../../../lib/bow/shaped-rows.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { loadConfig } from "../../../pipeline/config/config.js";

const radii = Float64Array.from([50, 120, 150, 400, 1000, 2500]);

describe("which drops are flattened, where on the bow, and at what cost", () => {
  it("equilibrium: from 150 µm radius up, at the arc position and sun elevation rounded to the rows' steps", () => {
    const request = profileRequestSchema.parse({
      drops: { kind: "marshall-palmer", rainRateMmPerH: 5, shape: { kind: "equilibrium" } },
      arcPositionDeg: 33.3,
      sun: { elevationDeg: 12.6 },
    });
    const plan = planDropShapes(request, radii);
    expect(plan.shapes.map((s) => s !== undefined)).toEqual([false, false, true, true, true, true]);
    expect(plan.shapes[2]).toMatchObject({ kind: "equilibrium", arcPositionDeg: 33.25, sunElevationDeg: 12.5, cantingSdDeg: 7.5, rayOnly: false });
    expect(plan.meta.flattenedRadii).toMatchObject({ fromUm: 150, toUm: 2500, nodes: 4 });
    // Axis ratios of the model at 0.3 mm and 5 mm diameter (Beard & Chuang 1987 Table 1: 0.708 at 5 mm).
    expect(plan.meta.flattenedRadii!.axisRatioFrom).toBeGreaterThan(0.999);
    expect(Math.abs(plan.meta.flattenedRadii!.axisRatioTo - 0.708)).toBeLessThan(0.01);
  });

  it("equilibrium showers share shape nodes up to SHAPE_NODES_MAX_RADIUS_UM; a single size keeps its own shape", () => {
    const shower = Float64Array.from({ length: 60 }, (_, k) => 150 * Math.pow(20, k / 59));
    const rain = profileRequestSchema.parse({ drops: { kind: "marshall-palmer", rainRateMmPerH: 5, shape: { kind: "equilibrium" } } });
    const plan = planDropShapes(rain, shower);
    const above = Array.from(shower).filter((r) => r > SHAPE_NODES_MAX_RADIUS_UM).length;
    expect(plan.shapes[0]?.deformationStep).toBe(DEFAULT_DEFORMATION_STEP);
    expect(plan.meta.shapesTraced).toMatchObject({ deformationStep: DEFAULT_DEFORMATION_STEP, upToRadiusUm: SHAPE_NODES_MAX_RADIUS_UM });
    expect(plan.tracedShapes).toBe(plan.meta.shapesTraced!.shapes);
    expect(plan.tracedShapes).toBeGreaterThan(above);
    expect(plan.tracedShapes).toBeLessThan(shower.length);
    // Priced by the shapes it traces: below the same shower with every radius its own shape.
    expect(shapedCostTermAngles(plan, 41, 600)).toBeLessThan(shapedCostTermAngles(planDropShapes(rain, shower, 0), 41, 600));
    const single = planDropShapes(profileRequestSchema.parse({ drops: { kind: "monodisperse", radiusUm: 700, shape: { kind: "equilibrium" } } }), Float64Array.from([700]));
    expect(single.shapes[0]?.deformationStep).toBeUndefined();
    expect(single.meta.shapesTraced).toEqual({ shapes: 1, deformationStep: null, upToRadiusUm: null });
  });

  it("spheroid: every size; geometric method: ray optics only; no arc position: the side, with a note", () => {
    const request = profileRequestSchema.parse({
      drops: { kind: "monodisperse", radiusUm: 800, shape: { kind: "spheroid", axisRatio: 0.85 } },
      method: "geometric",
    });
    const plan = planDropShapes(request, radii);
    expect(plan.shapes.every((s) => s?.kind === "spheroid" && s.axisRatio === 0.85 && s.rayOnly && s.arcPositionDeg === 90)).toBe(true);
    expect(plan.meta.note).toMatch(/side/);
    expect(plan.warnings.join(" ")).toMatch(/below 100 µm/);
  });

  it("spheres: no flattened rows, and an arc position is noted as changing nothing", () => {
    const plan = planDropShapes(profileRequestSchema.parse({ arcPositionDeg: 10 }), radii);
    expect(plan.flattened).toBe(false);
    expect(plan.shapes.every((s) => s === undefined)).toBe(true);
    expect(plan.meta.note).toMatch(/changes nothing/);
    expect(shapedCostTermAngles(plan, 41, 600)).toBe(0);
  });

  it("the README's synchronous example fits the default synchronous budget; the full spectrum does not", () => {
    const budget = loadConfig({}).maxProfileTermAngles;
    const drops = { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium" } };
    const plan = planDropShapes(profileRequestSchema.parse({ drops, arcPositionDeg: 0 }), Float64Array.from([1000]));
    // ψ 38–44° at 0.05° plus the sun's disc: about 132 lattice points; 500–600 nm in 20 nm steps: 6 wavelengths.
    expect(shapedCostTermAngles(plan, 6, 132)).toBeLessThan(budget);
    expect(shapedCostTermAngles(plan, 41, 612)).toBeGreaterThan(budget);
  });
});

// Drops above 1 mm radius canted less than ROTATION_MIN_CANTING_SD_DEG take the banded canting rule near a mirror
// plane (lib/bow/shaped-rows.ts BANDED_FROM_RADIUS_UM, measured in bench/canting-spread.ts): their spec asks for it and
// their planes are counted with its nodes.
describe("the banded canting rule of large drops", () => {
  const at = (radiiUm: number[], arcPositionDeg: number) =>
    planDropShapes(
      profileRequestSchema.parse({ drops: { kind: "monodisperse", radiusUm: radiiUm[0], shape: { kind: "equilibrium", cantingSdDeg: 1.5 } }, arcPositionDeg }),
      Float64Array.from(radiiUm),
    );
  it("is asked for above 1 mm radius only, and priced with its nodes: at canting 1.5° 12 planes at the top against the five-node rule's 4", () => {
    const top = at([1000, 2000], 0);
    expect(top.shapes.map((s) => s?.cantingBand === true)).toEqual([false, true]);
    expect(top.tracedShapes).toBe(2);
    expect(top.tracedPlanes).toBe(4 + 12);
    expect(shapedPlaneCounts(top, 6)).toEqual({ traced: 16 * INDEX_NODES, interpolated: 16 * 6 });
    // At the side of the bow both take the five-node rule.
    expect(at([1000, 2000], 90).tracedPlanes).toBe(10);
    // Its rows are keyed apart.
    expect(shapedRowKey(top.shapes[1]!)).not.toBe(shapedRowKey({ ...top.shapes[1]!, cantingBand: undefined }));
    expect(top.rotationShapes).toBe(0);
  });
});

// Drops above 1 mm radius canted by at least ROTATION_MIN_CANTING_SD_DEG take the canting mean by rotation over the
// pupil (lib/bow/canting-rotation.ts, measured in bench/canting-splat.ts): no planes, their own key and price.
describe("the canting mean by rotation of large drops", () => {
  const at = (radiiUm: number[], cantingSdDeg?: number) =>
    planDropShapes(
      profileRequestSchema.parse({
        drops: { kind: "monodisperse", radiusUm: radiiUm[0], shape: { kind: "equilibrium", ...(cantingSdDeg === undefined ? {} : { cantingSdDeg }) } },
        arcPositionDeg: 0,
      }),
      Float64Array.from(radiiUm),
    );
  it("is asked for above 1 mm radius at the default canting, with no planes traced, keyed and priced apart", () => {
    const plan = at([1000, 2000]);
    expect(plan.shapes.map((s) => s?.cantingRotation === true)).toEqual([false, true]);
    expect(plan.shapes[1]!.cantingBand).toBeUndefined();
    expect(plan.rotationShapes).toBe(1);
    expect(plan.tracedPlanes).toBe(4);
    expect(shapedRowKey(plan.shapes[1]!)).not.toBe(shapedRowKey({ ...plan.shapes[1]!, cantingRotation: undefined }));
    expect(shapedCostTermAngles(plan, 41, 600)).toBeGreaterThan(shapedCostTermAngles(at([1000]), 41, 600) + 1.7e9);
    expect(plan.meta.cantingSource).toMatch(/rotation over the upright drop's pupil/);
  });
  it("is not asked for below 2° of canting (the banded rule then), nor for upright drops", () => {
    expect(at([2000], 1.5).shapes[0]).toMatchObject({ cantingBand: true });
    expect(at([2000], 1.5).shapes[0]!.cantingRotation).toBeUndefined();
    expect(at([2000], 0).shapes[0]!.cantingRotation).toBeUndefined();
  });
});

// The canting rules' measured reach (BENCHMARKS.md canting-spread: within 0.22 of the peak of brute force over the pupil
// up to 1 mm radius, 0.26 at 1.5 mm and 0.60 at 2 mm): larger drops the rules serve are flagged; upright, smaller ones, or
// those the mean by rotation serves (canted 2° or more) are not.
describe("the warning on the canting mean of large drops", () => {
  const plan = (radiusUm: number, cantingSdDeg?: number) =>
    planDropShapes(
      profileRequestSchema.parse({ drops: { kind: "monodisperse", radiusUm, shape: { kind: "equilibrium", ...(cantingSdDeg === undefined ? {} : { cantingSdDeg }) } } }),
      Float64Array.from([radiusUm]),
    );
  const flagged = (p: ReturnType<typeof plan>) => p.warnings.some((w) => /canting mean/.test(w));
  it("is given for drops above 1 mm radius canted too little for the mean by rotation, and names where it was measured", () => {
    const warned = plan(2000, 1.5);
    expect(flagged(warned)).toBe(true);
    expect(warned.warnings.find((w) => /canting mean/.test(w))).toMatch(/BENCHMARKS\.md canting-spread/);
  });
  it("is not given at 1 mm, nor for upright drops of any size, nor where the mean by rotation serves", () => {
    expect(flagged(plan(1000))).toBe(false);
    expect(flagged(plan(2000, 0))).toBe(false);
    expect(flagged(plan(2000))).toBe(false);
  });
});
