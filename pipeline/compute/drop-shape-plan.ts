// Which drops of a profile request are served as flattened drops, with what shape and at which place on the bow,
// and what the response's meta says about it.

import type { ProfileRequest } from "../../schemas/profile.js";
import type { ShapeMeta } from "../../schemas/responses/shape-meta.js";
import { CANTING_SD_DEG } from "../../lib/drops/shape/canting.js";
import { planeCantingNodes } from "../../lib/bow/plane-canting-nodes.js";
import { AUTO_AIRY_FROM_RADIUS_UM } from "../../lib/bow/engine-choice.js";
import { outlineAxisRatio } from "../../lib/drops/shape/outline.js";
import { equilibriumOutline } from "../../lib/drops/shape/equilibrium-shape.js";
import {
  ARC_POSITION_STEP_DEG,
  BANDED_FROM_RADIUS_UM,
  EQUILIBRIUM_NOTE,
  ROTATION_FROM_RADIUS_UM,
  FLATTENED_FROM_RADIUS_UM,
  INDEX_NODES,
  outlineFor,
  quantiseSpec,
  SUN_ELEVATION_STEP_DEG,
  SHAPE_NODES_MAX_RADIUS_UM,
  tracedShapeCount,
  type ShapedPlaneCount,
  type ShapedRowSpec,
} from "../../lib/bow/shaped-rows.js";
import { waterIndexSpan } from "../../lib/water/index-range.js";
import { ROTATION_ELEVATIONS_PER_SD, ROTATION_MIN_CANTING_SD_DEG, ROTATION_SPAN_SD } from "../../lib/bow/canting-rotation.js";

/** Where along the bow a profile of flattened drops is taken when the request does not say: its side. */
export const DEFAULT_ARC_POSITION_DEG = 90;

export interface ShapePlan {
  /** Per radius node: the flattened drop's spec, or undefined for a sphere. */
  shapes: (ShapedRowSpec | undefined)[];
  flattened: boolean;
  /** Shapes the flattened drops are traced with: one per radius node, fewer where they share shape nodes. */
  tracedShapes: number;
  /** Scattering planes per refractive index traced for them: each shape's canting nodes (planeCantingNodes) summed. */
  tracedPlanes: number;
  /** Shapes whose canting mean is taken by rotation over the pupil (ShapedRowSpec.cantingRotation): no planes traced. */
  rotationShapes: number;
  meta: ShapeMeta;
  warnings: string[];
}

const ENGINE =
  "3D ray tracing through the drop (Fresnel coefficients for both polarisations, orders 0–3) with the primary and secondary bows in the uniform Airy form per scattering plane (Chester, Friedman & Ursell 1957; Berry & Mount 1972), phases and amplitudes from the traced rays; for drops above 1 mm radius canted by 2° or more, the canting mean by rotation over the upright drop's pupil (ray optics, orders 0–3, every ray of a grid traced under suns over ±3.5σ of elevation and weighed by the density of the tilts that send it to the place on the bow; the primary's and the secondary's light then spread over the scattering angle by their folds' Airy kernels, the Wigner function of a cubic wavefront, Berry 1977, each fold's width from the upright drop's own scattering plane at the place)";
const ACCURACY =
  "sphere limit: within 3.3e-4 of the sphere engine's profile and 0.01° of its peaks; horizontal plane with the sun on the horizon: Descartes' angles within 1e-6°; vertical plane: a 2D trace within 1e-5° (test/lib/rays/shaped-drops.test.ts); each plane's light against brute force over the pupil (every ray of a grid, those leaving near the plane binned): within 12 % per 0.25° bin, 5 % over a fold of the in-plane offset, where a second root of it is traced back (1.5 mm drops at the side of the bow, test/lib/rays/fold-back.test.ts); the sky around the antisolar point against brute force over the whole pupil (every ray of a grid binned where it is seen), ray optics of orders 0, 2, 3 in 1° × 5° bins, upright drops: worst bin 0.018 of the brightest at 1 mm, 0.11 at 1.5 mm, 0.05 at 2 mm, 0.17 at 2.5 mm (BENCHMARKS.md sky-check; test/lib/rays/sky-brute.test.ts); each wavelength's bows blended from their uniform tables at 7 refractive indices fixed by the water, aligned on the interpolated fold (traced at the wavelength's own index where the bow's constants or rows do not follow one polynomial in n): worst ΔE2000 0.008 (1 mm drops, top of the bow), 0.017 (1 mm, arc 45°), 0.12 (2 mm, arc 45°) and 0.003 (Marshall–Palmer 2 mm/h, top) against tracing every wavelength (BENCHMARKS.md, shape-index and aligned-rows); a drop whose axis lies in the scattering plane (the top and foot of the bow) traced with it turned 0.125° out of the plane, where the sweeps missed a pair of roots (against brute force over the pupil: within 1.5–3.2 % of its light, 2 mm drops' secondary at the top; test/lib/bow/off-mirror-axis.test.ts); canting: up to 1 mm radius five tilts traced, each one's bow spread over the fold angles of its cell of the Gaussian of tilts, against the canting integral by brute force over the pupil (rotation invariance) worst 0.04–0.22 of the peak (BENCHMARKS.md canting-spread); above 1 mm (canting σ ≥ 2°) the mean by rotation over the upright drop's pupil (ray optics), against the same brute force at 550 nm worst 0.019–0.062 of the peak and 0.013–0.028 summed at 1.5 and 2 mm, 0.106 / 0.041 at 2.5 mm (BENCHMARKS.md canting-splat; test/lib/bow/canting-rotation.test.ts), its sphere limit as ray optics alone within 0.054 of textbook ray optics' ⟂ peak after the sun's disc (at Descartes' angle), with the Airy kernels within 0.017 (primary) and 0.058 (secondary) of each bow's peak from Airy's theory at a pupil step of 0.01 (test/lib/bow/canting-rotation.test.ts; the service's step, 0.017 at the tilts' mode growing to 0.034 away from it, leaves a fold bias of the pupil cells, largest at the secondary's fold near the rim: a sphere's secondary 0.28 of its own peak off ray optics), its own sampling noise as ΔE2000 between two draws of its grids on Marshall–Palmer 25 mm/h in BENCHMARKS.md rotation-noise; equilibrium drops up to 1 mm in a size distribution blended from shape nodes 0.0075 apart in deformation: worst ΔE2000 0.27 at the top of the bow and 0.008 at its side (Marshall–Palmer 2 mm/h, canting 7.5°) against every radius with its own shape (BENCHMARKS.md aligned-rows-nodes-steps)";
const DEFAULT_NOTE =
  "spheres unless drops.shape says otherwise: a cold default profile with equilibrium shapes traces 11 drop shapes up to 1 mm radius (its flattened radius nodes there on shape nodes) × 5 canting nodes × 7 scattering planes (and, where a bow changes form between those indices, one per wavelength) and averages 7 larger ones over their canting by rotation over the pupil, measured at 49 times the default profile's cold time in the same run (33.0 s against 0.668 s, 2026-12-05, engine 23), against the 1.5 s goal (BENCHMARKS.md, flattened drops); ask drops.shape {\"kind\":\"equilibrium\"} for raindrops' real shapes";

/**
 * Up to this radius the canting rules were measured within 0.22 of the peak of brute force over the pupil; above it,
 * 0.13–0.26 at 1.5 mm and 0.50–0.60 at 2 mm (BENCHMARKS.md canting-spread, 2026-12-04): such drops get a warning where
 * the rules serve them (canting below ROTATION_MIN_CANTING_SD_DEG; else the mean by rotation does).
 */
export const CANTING_MEAN_MEASURED_TO_RADIUS_UM = 1000;

/**
 * Equilibrium drops up to SHAPE_NODES_MAX_RADIUS_UM share the planes of shape nodes this far apart in deformation
 * 1 − q (ShapedRowSpec.deformationStep). Measured on Marshall–Palmer showers (canting 7.5°, sun 10°, 20 nm) against
 * every radius traced with its own shape and every wavelength at its own index, CPU against every radius its own shape
 * in the same run (BENCHMARKS.md aligned-rows-nodes-top and aligned-rows-nodes-steps, 2026-12-04): at the top of the
 * bow, where flattening moves the bow fastest, worst ΔE2000 0.084 / 0.27 / 0.48 / 0.79 at 2 mm/h with steps 0.005 /
 * 0.0075 / 0.01 / 0.02, at 0.87 / 0.72 / 0.61 / 0.54 of the CPU; at the side (arc 90°) 0.008 at 0.66 with 0.0075.
 * 0.0075 keeps the worst below the ΔE2000 0.5 that issue 13 allows the rows' quantisation, with room for the others.
 */
export const DEFAULT_DEFORMATION_STEP = 0.0075;

/**
 * deformationStep: equilibrium drops blended from shape nodes (ShapedRowSpec.deformationStep); 0: each radius its own
 * shape. rotationGrid: benchmarks only, the canting mean by rotation's grid (ShapedRowSpec.rotationGrid).
 */
export function planDropShapes(
  request: ProfileRequest,
  radiiUm: Float64Array,
  deformationStep = DEFAULT_DEFORMATION_STEP,
  rotationGrid?: ShapedRowSpec["rotationGrid"],
): ShapePlan {
  const shape = request.drops.shape ?? { kind: "sphere" as const };
  if (shape.kind === "sphere") {
    const meta: ShapeMeta = { model: "sphere", default: DEFAULT_NOTE };
    if (request.arcPositionDeg !== undefined) {
      meta.note = `arcPositionDeg ${request.arcPositionDeg} changes nothing for spherical drops: their bow is the same all along the arc`;
    }
    return { shapes: Array.from(radiiUm, () => undefined), flattened: false, tracedShapes: 0, tracedPlanes: 0, rotationShapes: 0, meta, warnings: [] };
  }
  const arcPositionDeg = request.arcPositionDeg ?? DEFAULT_ARC_POSITION_DEG;
  const ownShapes = quantiseSpec({
    kind: shape.kind,
    axisRatio: shape.kind === "spheroid" ? shape.axisRatio : undefined,
    cantingSdDeg: shape.cantingSdDeg,
    sunElevationDeg: request.sun.elevationDeg,
    arcPositionDeg,
    rayOnly: request.method === "geometric",
    indexSpan: waterIndexSpan(request.water),
  });
  const flattens = (r: number) => shape.kind === "spheroid" || r >= FLATTENED_FROM_RADIUS_UM;
  const flattenedRadii = Array.from(radiiUm).filter(flattens);
  // Shape nodes only where they save shapes: a single size (or a few far apart) is traced with its own shape.
  const onNodes = shape.kind === "equilibrium" && deformationStep > 0 ? { ...ownShapes, deformationStep } : undefined;
  const nodeShapes = onNodes ? tracedShapeCount(onNodes, flattenedRadii) : Infinity;
  const spec = onNodes && nodeShapes < flattenedRadii.length ? onNodes : ownShapes;
  // Large drops take the canting mean by rotation (lib/bow/shaped-rows.ts ROTATION_FROM_RADIUS_UM) or, canted less than
  // ROTATION_MIN_CANTING_SD_DEG, the banded canting rule near a mirror plane (BANDED_FROM_RADIUS_UM): a spec of their
  // own, whose rows are keyed apart; they never share shape nodes (SHAPE_NODES_MAX_RADIUS_UM ≤ the threshold).
  const byRotation = shape.cantingSdDeg >= ROTATION_MIN_CANTING_SD_DEG;
  const largeSpec: ShapedRowSpec = byRotation ? { ...spec, cantingRotation: true, ...(rotationGrid ? { rotationGrid } : {}) } : { ...spec, cantingBand: true };
  const largeFrom = byRotation ? ROTATION_FROM_RADIUS_UM : BANDED_FROM_RADIUS_UM;
  const spheroidLarge = shape.kind === "spheroid" && shape.axisRatio < outlineAxisRatio(equilibriumOutline(largeFrom));
  const large = (r: number) => (shape.kind === "equilibrium" ? r > largeFrom : spheroidLarge);
  const shapes = Array.from(radiiUm, (r) => (flattens(r) ? (large(r) ? largeSpec : spec) : undefined));
  const groups = [spec, largeSpec].map((s) => ({ spec: s, radii: flattenedRadii.filter((r) => (s === largeSpec) === large(r)) })).filter((g) => g.radii.length > 0);
  const tracedShapes = groups.reduce((n, g) => n + tracedShapeCount(g.spec, g.radii), 0);
  const rotated = groups.filter((g) => g.spec.cantingRotation);
  const rotationShapes = rotated.reduce((n, g) => n + tracedShapeCount(g.spec, g.radii), 0);
  const tracedPlanes = groups.filter((g) => !g.spec.cantingRotation).reduce((n, g) => n + tracedShapeCount(g.spec, g.radii) * planeCantingNodes(g.spec).length, 0);
  const ratios = flattenedRadii.length
    ? [flattenedRadii[0], flattenedRadii[flattenedRadii.length - 1]].map((r) => Math.round(outlineAxisRatio(outlineFor(spec, r)) * 1e4) / 1e4)
    : [];
  const meta: ShapeMeta = {
    model: shape.kind === "equilibrium" ? "equilibrium (Beard & Chuang 1987; Chuang & Beard 1990 Table 1 coefficients)" : `spheroid, axis ratio ${shape.axisRatio}`,
    engine: ENGINE,
    accuracy: ACCURACY,
    flattenedRadii: flattenedRadii.length
      ? { fromUm: flattenedRadii[0], toUm: flattenedRadii[flattenedRadii.length - 1], nodes: flattenedRadii.length, axisRatioFrom: ratios[0], axisRatioTo: ratios[1] }
      : null,
    shapesTraced: {
      shapes: tracedShapes,
      deformationStep: spec.deformationStep ?? null,
      upToRadiusUm: spec.deformationStep ? SHAPE_NODES_MAX_RADIUS_UM : null,
    },
    cantingSdDeg: shape.cantingSdDeg,
    cantingSource:
      `default ${CANTING_SD_DEG}°: Huang, Bringi & Thurai 2008 measured 7–8°; ` +
      (byRotation
        ? `drops above ${ROTATION_FROM_RADIUS_UM} µm radius: the mean over every tilt by rotation over the upright drop's pupil (a drop tilted to (h′, δ) scatters as the upright drop with the sun at h′ seen δ further along the arc; ray optics, its pupil traced at ${ROTATION_ELEVATIONS_PER_SD * 2 * ROTATION_SPAN_SD + 1} sun elevations over ±${ROTATION_SPAN_SD}σ); smaller drops: five tilts traced (a 5-point rule exact to degree 3), their bows spread over the angles the whole Gaussian of tilts sends them to (BENCHMARKS.md, canting-spread and canting-splat)`
        : `five tilts traced (a 5-point rule exact to degree 3), or for drops above ${BANDED_FROM_RADIUS_UM} µm radius within 2.5σ of tilt of the top or foot of the bow 3 tilts in the sun's plane × cells 1° wide across it, their bows spread over the angles the whole Gaussian of tilts sends them to (BENCHMARKS.md, canting-spread); canting below ${ROTATION_MIN_CANTING_SD_DEG}° is not averaged by rotation`),
    arcPositionDeg: spec.arcPositionDeg,
    sunElevationDeg: spec.sunElevationDeg,
    quantisation: `kernel rows are keyed on the sun's elevation to ${SUN_ELEVATION_STEP_DEG}° and the arc position to ${ARC_POSITION_STEP_DEG}°`,
    default: DEFAULT_NOTE,
  };
  if (shape.kind === "equilibrium") meta.spheres = EQUILIBRIUM_NOTE;
  if (request.arcPositionDeg === undefined) meta.note = `no arcPositionDeg given: the profile is taken at the side of the bow (${DEFAULT_ARC_POSITION_DEG}°)`;
  const warnings: string[] = [];
  // Airy-type bows need large drops: the sphere engine's own limit (lib/bow/engine-choice.ts) holds here too.
  if (flattenedRadii.length && flattenedRadii[0] < AUTO_AIRY_FROM_RADIUS_UM) {
    warnings.push(`flattened drops below ${AUTO_AIRY_FROM_RADIUS_UM} µm radius are served by Airy-type theory outside its measured validity`);
  }
  const largest = flattenedRadii[flattenedRadii.length - 1];
  if (shape.cantingSdDeg > 0 && !byRotation && largest > CANTING_MEAN_MEASURED_TO_RADIUS_UM) {
    warnings.push(
      `the canting mean of drops above ${CANTING_MEAN_MEASURED_TO_RADIUS_UM} µm radius is approximate: against brute force over the pupil it is off by up to 0.26 (1.5 mm) and 0.60 (2 mm) of the peak, 0.10 and 0.23–0.38 summed over the bow (BENCHMARKS.md canting-spread)`,
    );
  }
  return { shapes, flattened: flattenedRadii.length > 0, tracedShapes, tracedPlanes, rotationShapes, meta, warnings };
}

/**
 * Work of one flattened-drop scattering plane per angle bin, in the Lorenz–Mie term-angles the synchronous limit is
 * counted in (~0.75e9 term-angles/s per core, AUTO_DENSITY_BUDGET_TERM_ANGLES): measured on this project's 2-core
 * machine (2026-12-03 12:40 UTC, CPU time at load average ~7) on 1–2 mm equilibrium drops over 600 bins, a traced
 * plane took 120–230 ms (≈ 190 ms: 2.4e5 a bin) and a plane interpolated across the index from traced ones 25–65 ms
 * (≈ 40 ms: 5e4 a bin). The earlier estimate, 0.4 s a traced plane, was about 2× high. Since rows are blended across
 * the index with their bows aligned and shifted exactly (lib/bow/aligned-blend.ts) a wavelength's plane costs 7 ms
 * against a traced plane's 34 ms in one run (bench:shapes, 2026-12-03 21:18 UTC, P4's drop over 600 bins, CPU time):
 * 0.21 of the traced plane's 2.4e5 a bin, 5e4.
 */
export const SHAPED_TRACED_TERM_ANGLES_PER_BIN = 2.4e5;
export const SHAPED_INTERPOLATED_TERM_ANGLES_PER_BIN = 5e4;
/**
 * Work of one shape's canting mean by rotation (lib/bow/canting-rotation.ts), which hardly depends on the bins: its
 * pupil traced at every elevation and index node, and each wavelength's rays interpolated and spread. Measured
 * (2026-12-05 07:25 UTC, one thread, CPU time, 700 bins, canting 7.5°, sun 10°, arc 90°, engine 23's grid: pupil step
 * 0.017 at the tilts' mode growing to 0.034, half the pupil by the drop's mirror plane, cells spread as triangles, the
 * bows by Airy kernels) on 2 mm equilibrium drops: 1.50 s at one wavelength, 3.17 s at 41 (engine 22's uniform 0.02 in
 * the same process: 2.03–2.44 s and 4.05–4.26 s); at ~0.75e9 term-angles/s (SHAPED_TRACED_TERM_ANGLES_PER_BIN's rate),
 * 1.1e9 a shape and 3.1e7 a wavelength.
 */
export const ROTATION_SHAPE_TERM_ANGLES = 1.1e9;
export const ROTATION_WAVELENGTH_TERM_ANGLES = 3.1e7;

/**
 * Scattering planes a plan's flattened rows trace and interpolate, cold: per shape (each flattened radius node of
 * equilibrium drops, or the shape nodes they share; one for a spheroid, whose radii share their planes) and canting node, INDEX_NODES traced planes
 * (at the water's tracedIndices) and one made per wavelength from them (aligned tables, or traced at its own index). A shape's task split across threads is split by
 * canting node and order group (pipeline/kernels/canting-parts.ts): each order of a plane is traced once, and a plane
 * counts once, with its first order group (lib/bow/shaped-rows.ts shapedNodeRows), so the parts report these counts.
 */
export function shapedPlaneCounts(plan: ShapePlan, wavelengths: number): ShapedPlaneCount {
  const planes = plan.tracedPlanes;
  return { traced: planes * INDEX_NODES, interpolated: planes * wavelengths };
}

/** Term-angle equivalent of a plan's flattened rows (shapedPlaneCounts priced per bin). */
export function shapedCostTermAngles(plan: ShapePlan, wavelengths: number, bins: number): number {
  const { traced, interpolated } = shapedPlaneCounts(plan, wavelengths);
  const rotation = plan.rotationShapes * (ROTATION_SHAPE_TERM_ANGLES + wavelengths * ROTATION_WAVELENGTH_TERM_ANGLES);
  return bins * (traced * SHAPED_TRACED_TERM_ANGLES_PER_BIN + interpolated * SHAPED_INTERPOLATED_TERM_ANGLES_PER_BIN) + rotation;
}
