// |S1|², |S2|² of one flattened drop at one wavelength and one place on the bow, averaged over the drops'
// canting: the engine behind kernel rows for drops that are not spheres (lib/bow/kernel-rows.ts).

import { equilibriumOutline, SHAPE_TABLE_MAX_DIAMETER_MM } from "../drops/shape/equilibrium-shape.js";
import { spheroidOutline, type DropOutline } from "../drops/shape/outline.js";
import { shapeNodeWeights } from "../drops/shape/shape-nodes.js";
import { bowScatteringPlane, cantedAxis } from "../rays/bow-geometry.js";
import { planeCantingNodes, planeCantingRule } from "./plane-canting-nodes.js";
import { bandedCantingMean } from "./canting-band-spread.js";
import { localCantingMean } from "./canting-spread.js";
import { offMirrorAxis } from "./off-mirror-axis.js";
import { ROTATION_SLICES, rotationCantingRowsAlong } from "./canting-rotation.js";
import type { CantingNode } from "../drops/shape/canting.js";
import { chebyshevNodes, interpolateSweep, lagrangeWeights } from "../rays/sweep-interpolation.js";
import type { PlaneSweep, ScatteringPlane, Vec3 } from "../rays/plane-sweep.js";
import { addBlendedContexts, leaveOneOutMiss, leaveOneOutRowMiss, padFor, paddedGrid, shiftScratch } from "./aligned-blend.js";
import { bowFold } from "./plane-bow-table.js";
import { REQUEST_WAVELENGTHS_NM, WATER_INDEX_RANGE } from "../water/index-range.js";
import {
  contextFromSweeps,
  SHAPED_BOW_ORDERS,
  SHAPED_RAY_ORDERS,
  shapedPlaneRow,
  shapedPlaneSweeps,
  shapedPlaneTracer,
  type ShapedPlaneContext,
  type ShapedPlaneOptions,
} from "./shaped-plane-rows.js";

/** Drops below this radius stay spheres under "equilibrium": see EQUILIBRIUM_NOTE. */
export const FLATTENED_FROM_RADIUS_UM = 150;
export const EQUILIBRIUM_NOTE =
  "below 150 µm radius 1 − axis ratio < 5e-4 (equilibrium shapes scaled as Pruppacher & Pitter 1971 measured), which moves the top of the bow by < 0.05° (measured on spheroids: about 1° per 0.01 of flattening): those drops are spheres";

/**
 * Sun elevation and arc position are rounded to these steps for the kernel rows and their cache keys. Measured
 * on 2 mm drops (axis ratio 0.93, sun 10°): the fold angles move by 0.22° per degree of arc position at arc 45°
 * (most) and by 0.24° per degree of sun elevation, so half a step moves them by at most 0.014° (arc) and 0.03° (sun). In colour
 * (bench/shape-colour.ts, BENCHMARKS.md): one step moves a profile of 2 mm drops at arc 45° by ΔE2000 up to 15 (sun)
 * and 29 (arc) at the bow's sharp edge, 1.1 and 1.9 on average (single sizes). On showers (Marshall–Palmer 2 mm/h,
 * equilibrium shapes, no canting, D65 light, ψ 36–56°: bench/arc-colour.ts, BENCHMARKS.md arc-colour) half an arc
 * step of 0.5° cost 1.33 worst, 0.18 mean: the arc step is 0.125°. Over ψ 30–56° half a step still costs 0.97 (arc)
 * and 1.34 (sun) at worst on 2 mm/h, 4.0 and 4.0 on 25 mm/h, near ψ 35° where those showers' luminance moves by 7 %
 * per 0.25° of elevation; 0.07–0.23 on average: not below 0.5 at worst without canting. With the drops canted by the
 * default 7.5° (BENCHMARKS.md arc-colour-canted, engine 23) half a step costs 0.09–0.13 (sun) and 0.06–0.07 (arc) at
 * worst on both showers, below 0.5. The finer arc step costs no work: a request's rows are
 * one arc position's either way, and views take theirs at nodes 5° apart (pipeline/compute/arc-nodes.ts), on the
 * lattice; profile requests share rows only within 0.0625° of arc position instead of 0.25°.
 */
export const SUN_ELEVATION_STEP_DEG = 0.25;
export const ARC_POSITION_STEP_DEG = 0.125;

export interface ShapedRowSpec {
  kind: "equilibrium" | "spheroid";
  /** Spheroids only: vertical over horizontal axis. */
  axisRatio?: number;
  /**
   * Equilibrium only: each radius's row is blended from the rows, at its own size, of the two shape nodes this far
   * apart in deformation 1 − q that bracket its shape (lib/drops/shape/shape-nodes.ts), each shifted so that its bow
   * lands at the nodes' folds weighted as their rows, so that radii share traced planes; drops above
   * SHAPE_NODES_MAX_RADIUS_UM keep their own shape. 0 or absent: every radius its own shape. The service asks for
   * pipeline/compute/drop-shape-plan.ts DEFAULT_DEFORMATION_STEP (its measurements there).
   */
  deformationStep?: number;
  cantingSdDeg: number;
  sunElevationDeg: number;
  arcPositionDeg: number;
  /** True: ray optics only (method "geometric"); false: Airy-type bows. */
  rayOnly: boolean;
  /**
   * Benchmarks and tests only: each plane traced at the drop's own index instead of interpolated from tracedIndices
   * (the reference the interpolation is measured against).
   */
  traceEveryIndex?: boolean;
  /**
   * Benchmarks and tests only: how a drop's row is made from the planes traced at tracedIndices. "rows" (the default
   * for Airy-type bows; ray optics alone: "sweeps", defaultIndexBlend):
   * contexts at the traced indices, each bow's uniform table shifted so that its fold lands at the fold interpolated to
   * the drop's index and the tables blended with Lagrange weights in n before they are squared (alignedNodeRows); "sweeps": each drop's sweeps interpolated across n
   * sample by sample and made into a context of its own (the path before issue 13's aligned rows).
   */
  indexBlend?: "rows" | "sweeps";
  /**
   * The span of the drops' index the traced indices cover: the request's water over every wavelength a request may ask
   * for (lib/water/index-range.ts waterIndexSpan), so that the indices depend on the water alone; absent: the span
   * over every water the service accepts (WATER_INDEX_RANGE).
   */
  indexSpan?: { min: number; max: number };
  /**
   * Kernel tasks split across threads only (pipeline/kernels/canting-parts.ts): the share of the orders of
   * SHAPED_ORDER_GROUPS[orderGroup] alone; absent: every order, group by group.
   */
  orderGroup?: number;
  /**
   * True: near a mirror plane the canting mean takes the banded rule (lib/bow/plane-canting-nodes.ts placeCantingRule);
   * absent: the five-node rule everywhere. The service sets it for drops above BANDED_FROM_RADIUS_UM.
   */
  cantingBand?: boolean;
  /**
   * True: the canting mean is taken by rotation over the upright drop's pupil (lib/bow/canting-rotation.ts), every
   * order at once, with no canting nodes. The service sets it for drops above ROTATION_FROM_RADIUS_UM canted by at
   * least ROTATION_MIN_CANTING_SD_DEG.
   */
  cantingRotation?: boolean;
  /**
   * With cantingRotation, camera views only: other places on the bow (arc positions) whose rows the same pass over the
   * pupil gives, returned beside the spec's own (rotationMeanRows' siblings; the kernel cache keeps them as the rows
   * of the spec at those places). Not in the key: it changes no row.
   */
  siblingArcsDeg?: readonly number[];
  /** Benchmarks only: the rotation's pupil step, density of elevations and draw of grid turns (RotationSetup.grid). */
  rotationGrid?: { pupilStep: number; elevationsPerSd: number; draw?: number; growthCap?: number };
}

/**
 * Drops above this radius take the banded canting rule near a mirror plane (ShapedRowSpec.cantingBand). Measured against
 * brute force over the pupil (bench/canting-spread.ts, issue 13's notes), worst of the peak / summed: 2 mm drops at the
 * top of the bow 1.144 / 1.060 with the five-node rule, 0.596 / 0.251 banded; at arc 10° 0.734 / 0.466 and 0.550 /
 * 0.228; 1 mm drops at the top 0.215 / 0.105 and 0.154 / 0.091, for 15 planes instead of 4 there (33–39 instead of 5
 * within 19° of it): at 1 mm and below the gain does not pay for 3.75–8 times the planes.
 */
export const BANDED_FROM_RADIUS_UM = 1000;

/**
 * Drops above this radius take the canting mean by rotation (ShapedRowSpec.cantingRotation) where the drops are canted
 * by at least ROTATION_MIN_CANTING_SD_DEG: against brute force over the pupil (550 nm, canting 7.5°, after the sun's
 * disc, BENCHMARKS.md canting-splat), worst share of the peak / summed, the rules against the rotation: 2 mm drops at
 * the top of the bow 0.596 / 0.251 and 0.074 / 0.017, at the side 0.502 / 0.377 and 0.019 / 0.011; 1.5 mm at the side
 * 0.257 / 0.104 and 0.051 / 0.020; 2.5 mm at arc 45° 1.179 / 0.355 and 0.079 / 0.034 (2026-12-05, engine 21). At 1 mm
 * the rotation is better too (0.215 / 0.105 and 0.087 / 0.027 at the top) but costs about 2 s of CPU a shape at one
 * wavelength, 4 s at 41, against the rules' 0.2–0.4 s at one index, and drops up to 1 mm share the planes of shape nodes (SHAPE_NODES_MAX_RADIUS_UM); its bows' wave
 * structure comes from a sphere's fold width (lib/bow/airy-spread.ts), where the rules' Airy-type planes each take
 * their own.
 */
export const ROTATION_FROM_RADIUS_UM = 1000;

/**
 * The scattering orders of a flattened drop's row in the groups it is computed in, each group's share on its own (its
 * own sweeps and context, lib/bow/shaped-plane-rows.ts): reflection and transmission, the primary's order, the
 * secondary's. Orders are independent: a ray of order p is traced no further than its p-th chord (PlaneTracer's upTo),
 * each order's sweep has its own coarse look and window (shapedPlaneSweeps), and a context's rows are the sum of its
 * orders' ray bins and bow tables (contextFromSweeps, shapedPlaneRow), so the groups' shares add up to the row of all
 * orders and no order is traced twice. Kernel tasks of one shape are split by canting node and order group so that
 * the pool's threads are kept busy (pipeline/kernels/canting-parts.ts).
 */
export const SHAPED_ORDER_GROUPS: readonly (readonly number[])[] = [[0, 1], [2], [3]];

export function quantiseSpec(spec: ShapedRowSpec): ShapedRowSpec {
  return {
    ...spec,
    sunElevationDeg: Math.round(spec.sunElevationDeg / SUN_ELEVATION_STEP_DEG) * SUN_ELEVATION_STEP_DEG,
    arcPositionDeg: Math.round(spec.arcPositionDeg / ARC_POSITION_STEP_DEG) * ARC_POSITION_STEP_DEG,
  };
}

/**
 * Version of the flattened-drop engine's numbers, in its rows' cache keys: raised when they change (23: the canting mean by
 * rotation's pupil step is 0.017 at the tilts' mode and grows as e^{z²/8} to twice that at elevations z·σ away from it
 * (canting-rotation.ts rotationPupilStep), where engine 22 took 0.02 everywhere: Marshall–Palmer 25 mm/h cold in 0.80–0.82
 * of the time, its sampling noise 0.14–0.24 ΔE2000 between draws instead of 0.29–0.31; and each place's pupil cells keep
 * only the corners it takes light from, so that its rows are the same bits in a pass with other places (the coarser
 * outer grids broke that), which moves rows by at most 2.6e-4 of their peak; 22: the canting mean by
 * rotation spreads its primary's and secondary's light by the folds' Airy kernels (lib/bow/airy-spread.ts), the bows'
 * wave structure restored, each fold's width from its place's plane: monodisperse 1.5 mm drops move by ΔE2000 up to 0.44 at
 * the top of the bow and 0.85 at its side, 2 mm drops canted 2° by 0.77 at arc 45°, Marshall–Palmer 25 mm/h by 0.03–0.07; 21: the canting mean
 * by rotation traces half the pupil by the drop's mirror plane and spreads each pupil cell as two triangles
 * (lib/bow/triangle-bins.ts), its sampling noise a third of the segments' at 2 mm, sun 30°, side; 20: drops above
 * ROTATION_FROM_RADIUS_UM canted by at least ROTATION_MIN_CANTING_SD_DEG take the canting mean by rotation over the
 * upright drop's pupil (lib/bow/canting-rotation.ts); 19: the banded rule
 * for drops above BANDED_FROM_RADIUS_UM only (ShapedRowSpec.cantingBand); 18: near a mirror
 * plane (within 2.5σ of tilt across it of the top or foot of the bow) the canting mean takes the banded rule, 1°-wide
 * cells of tilt across the plane (lib/bow/plane-canting-nodes.ts placeCantingRule, lib/bow/canting-band-spread.ts):
 * against brute force over the pupil, 2 mm drops at the top 1.06 → 0.25 summed, at arc 10° 0.47 → 0.23; 17: a drop whose
 * axis lies in the scattering plane, as at the top and foot of the bow, is traced with it turned 0.125° out of the
 * plane (lib/bow/off-mirror-axis.ts): in the mirror plane the sweeps lost a pair of roots and made a spike, against
 * brute force 1.6–3.1× the light of the secondary's order of 2 mm drops at the top; 16: a wavelength
 * whose canting nodes lack a fold takes the canting mean's fold model from the nearest index of the same drop that has
 * one (cantingFolds) instead of adding its nodes' rows as they are; 15: roots a sweep
 * loses at gaps and hops are followed on (lib/rays/lost-roots.ts), a fold's partner is found at any spacing, and for
 * outlines flatter than axis ratio 0.92 a census finds the roots no run reaches (lib/rays/root-census.ts): against brute
 * force over the whole pupil on the sky (bench/sky-check.ts), the worst bin of the primary's order at 2 mm went from 0.50
 * of the brightest to 0.05, of the secondary's at 2.5 mm from 0.85 to 0.11; 14: the other root
 * of v*(u) beyond a fold of it is traced (lib/rays/fold-back.ts): 1.5 mm drops at the side of the bow gain the light
 * brute force finds at Θ 145.6–150.1°, ΔE2000 up to 9.5 on their profile; 13: the canting spread without a comb; 12: equilibrium
 * drops on shape nodes only up to SHAPE_NODES_MAX_RADIUS_UM, larger ones with their own shape; 11: co- and
 * cross-polar amplitudes interfere each on its own (one signed amplitude of both jumped where the co-polar ∥ term
 * changes sign near Brewster's angle: a bow's dark side 10× its peak, test/lib/bow/plane-bow-table.test.ts), and the
 * aligned blend blends the bows' uniform tables, not their squared rows (lib/bow/aligned-blend.ts addBlendedContexts),
 * and groups it does not serve are traced at each drop's index instead of interpolated across it; 10: rows blended
 * across the index with their bows aligned, alignedNodeRows (each wavelength's row from the rows at the traced indices,
 * shifted so that their folds meet); 9: ∂Y/∂v from each
 * trace's ray differential, Newton's search with step halving, no ray at grazing entry: rows move at runs' ends (P4:
 * ≤ 7e-3 of the peak, nearer sweeps 8× denser) and where the earlier search missed a whole bow (2 mm drops at arc 45°,
 * canting nodes 2 and 4: the secondary), BENCHMARKS.md plane-trace; 8: the canting mean spreads each node's bow over
 * the tilts of its cell, lib/bow/canting-spread.ts; 7: coarse
 * sweeps, every 8th pupil sample traced and the rest filled by cubics where trusted, rows move by ≤ 2.7e-4 of the
 * peak; 6: the in-plane search by chord and secant steps, which finds a ray more at some runs' ends; 5: traced at
 * INDEX_NODES indices over the water's own span, indexSpan; 4: every plane interpolated from planes traced at 7 fixed
 * indices over WATER_INDEX_RANGE; 3: a task's wavelengths share planes traced at
 * INDEX_NODES indices across the task's own range; 2: bow pairs read off the sweep, rows move by ≤ 2e-3
 * relative), so that only these rows are recomputed, not every kernel row. Rows on shape nodes (deformationStep) carry
 * the step in their key.
 */
export const SHAPED_ENGINE_VERSION = 23;

/** The part of a kernel row's cache key that tells what shape and geometry it was computed for. */
export function shapedRowKey(spec: ShapedRowSpec): string {
  const shape = spec.kind === "spheroid" ? `q${spec.axisRatio}` : spec.deformationStep ? `eq${spec.deformationStep}` : "eq";
  const direct = (spec.traceEveryIndex ? ":direct" : "") + (spec.rotationGrid ? `:grid${spec.rotationGrid.pupilStep}/${spec.rotationGrid.elevationsPerSd}/${spec.rotationGrid.draw ?? 0}${spec.rotationGrid.growthCap === undefined ? "" : `/${spec.rotationGrid.growthCap}`}` : "");
  const span = spec.indexSpan ? `:n${spec.indexSpan.min}-${spec.indexSpan.max}` : "";
  // A group's share is not a row: it never shares a key with one.
  const group = spec.orderGroup === undefined ? "" : `:g${spec.orderGroup}`;
  const band = spec.cantingRotation ? ":rot" : spec.cantingBand ? ":band" : "";
  return `shape${SHAPED_ENGINE_VERSION}:${shape}:c${spec.cantingSdDeg}${band}:s${spec.sunElevationDeg}:a${spec.arcPositionDeg}:${spec.rayOnly ? "rays" : "airy"}${span}${direct}${group}`;
}

/** A kernel row variant (rowVariant) with the shape of a drop that is not a sphere appended: its rows are other rows. */
export function shapedVariant(variant: string, shape: ShapedRowSpec | undefined): string {
  return shape ? `${variant}|${shapedRowKey(shape)}` : variant;
}

export function outlineFor(spec: Pick<ShapedRowSpec, "kind" | "axisRatio">, radiusUm: number): DropOutline {
  return spec.kind === "spheroid" ? spheroidOutline(spec.axisRatio!) : equilibriumOutline(radiusUm);
}

/**
 * Which drops share traced planes (one kernel task, one shapedRows call): a spheroid's at every radius, equilibrium
 * drops of one radius, or all of them when they are traced on shape nodes (neighbouring radii share nodes).
 */
export function shapeGroupKey(spec: ShapedRowSpec, radiusUm: number): string {
  if (spec.kind === "spheroid") return shapedRowKey(spec);
  return onShapeNodes(spec, radiusUm) ? `${shapedRowKey(spec)}|nodes` : `${shapedRowKey(spec)}|${radiusUm}`;
}

/**
 * Equilibrium drops up to this radius are blended from shape nodes (ShapedRowSpec.deformationStep); larger ones keep
 * their own shape, since a large drop's bow changes form between nodes (a second caustic enters the secondary's window,
 * the fold's curvature changes) in a way that a shift of the nodes' tables does not follow. Measured on 2026-12-03 by a
 * one-off script (not kept; issue 13's notes), nodes 0.005 apart, rows blended aligned against every radius with its
 * own shape (one wavelength, canting 7.5°, sun 10°): off by up to 0.0065 of the peak at 1 mm (top of the bow, arc 45°)
 * and 0.017 at arc 90°, 0.043 at 1.3 mm, 0.3–0.7 at 1.7–2.8 mm. On whole showers: BENCHMARKS.md aligned-rows-nodes-steps.
 */
export const SHAPE_NODES_MAX_RADIUS_UM = 1000;

/** Whether an equilibrium drop of this radius is blended from shape nodes rather than traced with its own shape. */
function onShapeNodes(spec: ShapedRowSpec, radiusUm: number): boolean {
  return spec.kind === "equilibrium" && (spec.deformationStep ?? 0) > 0 && radiusUm <= SHAPE_NODES_MAX_RADIUS_UM;
}

/** The shapes (by the radius whose outline they are; a spheroid's: 0) a drop's row is made of, and their weights. */
function shapesOf(spec: ShapedRowSpec, radiusUm: number): { radiusUm: number; weight: number }[] {
  if (spec.kind === "spheroid") return [{ radiusUm: 0, weight: 1 }];
  return onShapeNodes(spec, radiusUm) ? shapeNodeWeights(radiusUm, spec.deformationStep!) : [{ radiusUm, weight: 1 }];
}

/** How many shapes the drops of these radii are traced with: one per radius, fewer where they share shape nodes. */
export function tracedShapeCount(spec: ShapedRowSpec, radiiUm: readonly number[]): number {
  return new Set(radiiUm.flatMap((radiusUm) => shapesOf(spec, radiusUm).map((s) => s.radiusUm))).size;
}

/**
 * Refractive indices every plane is traced at, per shape and canting node: INDEX_NODES Chebyshev nodes over the span
 * of the drops' water's index across every wavelength a request may ask for (spec.indexSpan), the sweep at a drop's own
 * index interpolated from them (lib/rays/sweep-interpolation.ts). They depend on the water alone, so that a row
 * depends only on its drop, plane, wavelength and water, never on which other wavelengths shared its task. Measured
 * on one plane (1 and 2 mm equilibrium drops, sun 10°, arc 0° and 45°, no canting, Θ 125–155° at 0.05°, 41
 * wavelengths 380–780 nm at 15 °C) against tracing every wavelength: samples traced again per plane (of ~24,000) 2280,
 * 653, 1963 with 5 nodes over WATER_INDEX_RANGE (every water the service accepts, twice one water's span), 838, 589,
 * 1105 with 7 over it, and 604, –, 878 with 5 over a task's own span at 380–780 nm. On P4 (1 mm drops, canting 7.5°,
 * top of the bow, 41 wavelengths; one thread, CPU): 7 nodes over WATER_INDEX_RANGE 10.9 s, 5 over the water's span
 * 7.5 s but worst ΔE2000 0.51 at the top of the bow, 7 over the water's span 7.9 s and worst ΔE2000 0.069
 * (BENCHMARKS.md, shape-index), 5 over the task's span (before fixed nodes) 7.0 s.
 */
export const INDEX_NODES = 7;

/** The indices a spec's planes are traced at (see INDEX_NODES). */
export function tracedIndices(spec: ShapedRowSpec): readonly number[] {
  const span = spec.indexSpan ?? WATER_INDEX_RANGE;
  return chebyshevNodes(span.min, span.max, INDEX_NODES);
}

/**
 * Interpolated samples are checked (and traced at n where the check fails) unless every traced index sends their light
 * to one side of the grid, more than this beyond it. Θ at a fixed pupil point moves monotonically with n (each
 * refraction turns the ray further as n grows, Snell's law), so at an index between the nodes such a sample stays on
 * that side; past the outermost of 7 Chebyshev nodes over one water's span of 0.019–0.020 (at cos(π/14) = 0.975 of the
 * half-range, so 2.5e-4 in n beyond it, 13 % of the 1.9e-3 to the next node) Θ moves on by about 13 % of the
 * node-to-node shift, which was at most 3.4° per 3e-3 of n near grazing (1 mm drops, 380–780 nm, measured): about
 * 0.3°, inside 2° (over WATER_INDEX_RANGE, specs without indexSpan: 4.8e-4 beyond, 13 % of 3.7e-3, about 0.6°).
 */
const NEAR_MARGIN_DEG = 2;
const DEG = Math.PI / 180;

export interface ShapedDrop {
  radiusUm: number;
  /** Real refractive index at the drop's wavelength, and its size parameter 2πa/λ there. */
  mRe: number;
  x: number;
}

/**
 * Scattering planes a computation traced, and planes made per wavelength from those (interpolated across the index:
 * aligned rows, or interpolated sweeps where a bow needs them), what the cost estimates count.
 */
export interface ShapedPlaneCount {
  traced: number;
  interpolated: number;
}

/** The orders of one group (SHAPED_ORDER_GROUPS) as shaped-plane-rows options: rays alone (rayOnly) or with the bows. */
function groupOptions(spec: ShapedRowSpec, group: number): ShapedPlaneOptions {
  const orders = SHAPED_ORDER_GROUPS[group];
  const rayOrders: readonly number[] = spec.rayOnly ? [...SHAPED_RAY_ORDERS, ...SHAPED_BOW_ORDERS] : SHAPED_RAY_ORDERS;
  const bowOrders: readonly number[] = spec.rayOnly ? [] : SHAPED_BOW_ORDERS;
  return { rayOrders: rayOrders.filter((p) => orders.includes(p)), bowOrders: bowOrders.filter((p) => orders.includes(p)) };
}

/** The order groups a spec asks for: its own (a part of a split task), else all of them. */
export function orderGroupsOf(spec: ShapedRowSpec): number[] {
  if (spec.orderGroup === undefined) return SHAPED_ORDER_GROUPS.map((_, g) => g);
  if (!Number.isInteger(spec.orderGroup) || spec.orderGroup < 0 || spec.orderGroup >= SHAPED_ORDER_GROUPS.length) {
    throw new RangeError(`orderGroup ${spec.orderGroup} is not one of 0…${SHAPED_ORDER_GROUPS.length - 1}`);
  }
  return [spec.orderGroup];
}

/**
 * How far shape nodes' folds may be shifted, per unit of deformation step: twice the top of the bow's measured rate of
 * about 1° per 0.01 of flattening (EQUILIBRIUM_NOTE; the fastest place on the bow), so that a node's row shifted to the
 * fold interpolated between it and its neighbour never reads past its padded grid.
 */
const SHAPE_SHIFT_DEG_PER_STEP = 200;

/**
 * Airy-type rows are blended aligned; ray optics alone (rayOnly) keeps interpolated sweeps: its bow is a caustic whose
 * bin means (finite only as means of an integrable 1/√ spike) change shape with the caustic's place within its bin, which
 * a shift by linear interpolation does not follow. Measured on 1 mm equilibrium drops at the top of the bow, canting
 * 7.5°, 3 wavelengths, rows averaged over 0.5° against tracing each index: aligned rows off by up to 0.18 of the peak,
 * interpolated sweeps by 1.4e-3.
 */
function defaultIndexBlend(spec: ShapedRowSpec): "rows" | "sweeps" {
  return spec.rayOnly ? "sweeps" : "rows";
}

/**
 * Largest leave-one-out miss (aligned-blend.ts leaveOneOutMiss) of a bow's constants κ, C, D across the traced
 * indices for which its rows are blended aligned; past it the group's planes are traced at each drop's own index.
 * Measured on P4's canting node tilted 13° across the plane at the top of the bow (order 3,
 * 1 mm): D climbs 3.9, 4.4, 5.7, 9.0, 19, 101 and falls to 0.05 over the 7 indices (the fold meets another caustic
 * between the last two), misses ~1; the other nodes' constants miss < 1e-3.
 */
const CONSTANTS_MISS = 0.01;

/**
 * Largest leave-one-out miss of a group's rows (aligned-blend.ts leaveOneOutRowMiss, at checkX,
 * averaged over the sun's half-width each side) for which they are blended aligned; past it the group's planes are
 * traced at each drop's own index. Leaving a node out doubles the spacing the blend bridges, so the miss overstates the
 * blend's own error. Measured (rows averaged over 0.5° against tracing each index): aligned rows within 1e-3 of the
 * peak on 1 mm drops at the top; 2.5 mm drops at the top carry a second caustic in the secondary's window, 3,000 times
 * the reflection, that one shift does not follow (0.74 of the peak off).
 */
const ROWS_MISS = 0.02;
/**
 * The size parameter the row check (ROWS_MISS) is made at: the shape's radius (a spheroid's: the largest tabulated
 * drop's, as its rows serve every radius) in the shortest wavelength a request may ask for, where the bow is sharpest.
 * It depends on the shape alone, never on the drops of a task, so that a row is the same whichever wavelengths and
 * radii were computed with it.
 */
function checkX(shapeRadiusUm: number): number {
  const radiusUm = shapeRadiusUm > 0 ? shapeRadiusUm : (SHAPE_TABLE_MAX_DIAMETER_MM * 1000) / 2;
  return (2 * Math.PI * radiusUm) / (REQUEST_WAVELENGTHS_NM.fresh.min * 1e-3);
}
/** The sun's angular radius, 0.266° (common practice: its disc is 0.53° across), rounded. */
const SUN_HALF_WIDTH_DEG = 0.25;

/** One part of a drop's row: contexts, their weights and fold angles (degrees; null: nothing to align). */
interface RowSource {
  ctx: ShapedPlaneContext;
  weight: number;
  foldDeg: number | null;
}

/** A shape's rows for one (canting node, order group), on a grid padded by `pad` bins a side. */
interface PreparedGroup {
  pad: number;
  /** The sources of a drop's row at index n (Lagrange weights ell over the traced indices). */
  sourcesAt: (mRe: number, ell: Float64Array) => RowSource[];
}

/**
 * The fold angle (degrees) of a group's one bow order at each traced index; "none" where no index has one (nothing to
 * align), "some" where only some have (the bow leaves the window, or its fold meets another caustic, between them).
 */
function groupFoldsDeg(sweeps: (PlaneSweep | null)[][], traced: readonly number[], group: number): Float64Array | "none" | "some" {
  const bowOrder = groupBowOrder(group);
  if (bowOrder === undefined) return "none";
  const foldsDeg = new Float64Array(traced.length);
  let found = 0;
  for (let i = 0; i < traced.length; i++) {
    const sweep = sweeps[i][bowOrder];
    const fold = sweep ? bowFold(traced[i], sweep, 1) : null;
    if (fold !== null) found++;
    foldsDeg[i] = fold ? fold.thetaR / DEG : Number.NaN;
  }
  return found === traced.length ? foldsDeg : found === 0 ? "none" : "some";
}

/** True when every context's bow constants follow one polynomial in n (CONSTANTS_MISS); contexts without a bow: true. */
function constantsSmooth(ctxs: readonly ShapedPlaneContext[], traced: readonly number[]): boolean {
  if (ctxs.some((ctx) => ctx.folds.length !== 1)) return ctxs.every((ctx) => ctx.folds.length === 0);
  const keys = ["kappa", "cPerp", "cPar", "dPerp", "dPar"] as const;
  return keys.every((key) => leaveOneOutMiss(traced, ctxs.map((ctx) => ctx.folds[0].constants[key])) <= CONSTANTS_MISS);
}

/** One canting node's and order group's planes through one outline, traced at `indices`: the drop's axis, the group's options and sweeps. */
function tracedGroup(
  spec: ShapedRowSpec,
  node: CantingNode,
  group: number,
  outline: DropOutline,
  indices: readonly number[],
  plane: ScatteringPlane,
  thetaDeg: Float64Array,
  stepDeg: number,
): { axis: Vec3; options: ShapedPlaneOptions; sweeps: (PlaneSweep | null)[][] } {
  // Turned off the plane where it lies in it, for every trace of the node's planes (lib/bow/off-mirror-axis.ts).
  const axis = offMirrorAxis(cantedAxis(node.tiltXDeg, node.tiltYDeg), plane);
  const options = groupOptions(spec, group);
  return { axis, options, sweeps: shapedPlaneSweeps(indices.map((n) => ({ outline, axis, n })), plane, 1, thetaDeg, stepDeg, options) };
}

/**
 * shapedNodeRows's default path (ShapedRowSpec.indexBlend "rows"): each shape's planes are traced at tracedIndices and
 * made into contexts there; a drop's share is the contexts' rows at its own x, each shifted so that its bow's fold
 * lands at the fold interpolated to the drop's index (Lagrange in n over the traced indices, Press et al. 2007 Eq.
 * 3.2.1; and, for drops blended from two shape nodes, at the nodes' folds weighted as their rows are, linearly in
 * deformation: shape-nodes.ts), then blended with the same Lagrange weights (lib/bow/aligned-blend.ts). Groups without
 * a bow (reflection, transmission) blend unshifted; a group whose bow's constants do not follow a polynomial in n
 * (CONSTANTS_MISS), or whose rows the aligned blend does not rebuild (ROWS_MISS), has its planes traced at each drop's
 * own index, as traceEveryIndex does: measured on 1 mm drops at arc 45° and 2 mm drops at arc 90° (primary, canting
 * 7.5°, 41 wavelengths, one process), that costs 0.27–0.30 of the traces and 0.37–0.48 of the CPU of interpolating
 * their sweeps across n (lib/rays/sweep-interpolation.ts), which traces again most samples of a plane whose bow's
 * constants jump between the nodes, each by a search of its own rather than filled (coarse-sweep.ts). Bows are blended
 * as uniform tables (aligned-blend.ts addBlendedContexts). Shapes are prepared in ascending order and dropped once no drop left needs them, so memory stays at two
 * shapes' contexts.
 */
function alignedNodeRows(
  spec: ShapedRowSpec,
  drops: readonly ShapedDrop[],
  thetaDeg: Float64Array,
  stepDeg: number,
  asked: readonly { node: number; group: number }[],
  out: { perp: Float64Array; par: Float64Array }[][],
  foldsDeg: number[][],
  planes: ShapedPlaneCount,
): void {
  const allNodes = planeCantingNodes(spec);
  const uses = drops.map((drop) => shapesOf(spec, drop.radiusUm));
  const shapes = [...new Set(uses.flatMap((u) => u.map((s) => s.radiusUm)))].sort((a, b) => a - b);
  const lastShapeOf = uses.map((u) => Math.max(...u.map((s) => s.radiusUm)));
  const lastUse = new Map<number, number>();
  uses.forEach((u, d) => u.forEach((s) => lastUse.set(s.radiusUm, Math.max(lastUse.get(s.radiusUm) ?? 0, lastShapeOf[d]))));
  const plane = bowScatteringPlane(spec.sunElevationDeg, spec.arcPositionDeg);
  const traced = tracedIndices(spec);
  // The shape nodes' bows are shifted to the drops' folds: their grids are padded for it; a drop's own shape's is not.
  const nodeShapes = new Set(drops.flatMap((drop, d) => (onShapeNodes(spec, drop.radiusUm) ? uses[d].map((s) => s.radiusUm) : [])));
  const shapeShiftDeg = (shapeRadiusUm: number) => (nodeShapes.has(shapeRadiusUm) ? SHAPE_SHIFT_DEG_PER_STEP * spec.deformationStep! : 0);
  const prepared = new Map<number, PreparedGroup[]>();
  const scratch = shiftScratch(thetaDeg.length);

  const prepare = (shapeRadiusUm: number): PreparedGroup[] => {
    const outline = outlineFor(spec, shapeRadiusUm);
    const indices = [...new Set(drops.filter((_, d) => uses[d].some((s) => s.radiusUm === shapeRadiusUm)).map((drop) => drop.mRe))];
    return asked.map(({ node: nodeIndex, group }) => {
      const { axis, options, sweeps } = tracedGroup(spec, allNodes[nodeIndex], group, outline, traced, plane, thetaDeg, stepDeg);
      // Each wavelength's plane counts as one "interpolated" plane, made by aligned rows or interpolated sweeps alike.
      if (group === 0) {
        planes.traced += traced.length;
        planes.interpolated += indices.length;
      }
      const foldsDeg = groupFoldsDeg(sweeps, traced, group);
      const aligned = typeof foldsDeg !== "string";
      const shift = shapeShiftDeg(shapeRadiusUm);
      const pad = aligned ? padFor(Math.max(...foldsDeg) - Math.min(...foldsDeg) + shift, stepDeg) : padFor(shift, stepDeg);
      const grid = paddedGrid(thetaDeg, stepDeg, pad);
      const ctxs = foldsDeg === "some" ? [] : traced.map((n, i) => contextFromSweeps(n, sweeps[i], 1, grid, stepDeg, options));
      const followed = () => leaveOneOutRowMiss(traced, ctxs, foldsDeg as Float64Array, checkX(shapeRadiusUm), pad, stepDeg, thetaDeg.length, Math.round(SUN_HALF_WIDTH_DEG / stepDeg)) <= ROWS_MISS;
      if (foldsDeg === "none" || (aligned && constantsSmooth(ctxs, traced) && followed())) {
        return { pad, sourcesAt: (_, ell) => ctxs.map((ctx, i) => ({ ctx, weight: ell[i], foldDeg: aligned ? foldsDeg[i] : null })) };
      }
      const own = new Map<number, RowSource>();
      for (const mRe of indices) {
        const ctx = contextFromSweeps(mRe, shapedPlaneSweeps([{ outline, axis, n: mRe }], plane, 1, thetaDeg, stepDeg, options)[0], 1, grid, stepDeg, options);
        own.set(mRe, { ctx, weight: 1, foldDeg: ctx.folds.length === 1 ? ctx.folds[0].fold.thetaR / DEG : null });
      }
      return { pad, sourcesAt: (mRe) => [own.get(mRe)!] };
    });
  };

  const compose = (d: number) => {
    const drop = drops[d];
    const ell = lagrangeWeights(traced, drop.mRe);
    asked.forEach(({ node: nodeIndex }, k) => {
      const parts = uses[d].map((s) => {
        const group = prepared.get(s.radiusUm)![k];
        const sources = group.sourcesAt(drop.mRe, ell);
        const aligned = sources.every((source) => source.foldDeg !== null);
        // The part's own fold at the drop's index: the sources' folds with the sources' weights.
        const foldDeg = aligned ? sources.reduce((sum, source) => sum + source.weight * source.foldDeg!, 0) : null;
        return { weight: s.weight, pad: group.pad, sources, foldDeg };
      });
      // Shape nodes' folds meet at their weighted mean when every part has one; else each stays at its own.
      const meet = parts.every((part) => part.foldDeg !== null) ? parts.reduce((sum, part) => sum + part.weight * part.foldDeg!, 0) : null;
      // The share's fold, for the canting mean (shapedMeanRows): where its parts' folds met.
      foldsDeg[d][k] = meet ?? Number.NaN;
      const share = out[d][k];
      // With a common fold, every part's tables are blended in one (aligned-blend.ts: the shape nodes' phases blend as
      // the indices' do); else each part is blended at its own fold and the parts add as rows.
      const shifted = (part: (typeof parts)[number]) => {
        const target = meet ?? part.foldDeg;
        return part.sources.map((source) => ({
          ctx: source.ctx,
          shiftDeg: target !== null && source.foldDeg !== null ? target - source.foldDeg : 0,
          weight: allNodes[nodeIndex].weight * part.weight * source.weight,
          pad: part.pad,
        }));
      };
      const blends = meet !== null ? [parts.flatMap(shifted)] : parts.map(shifted);
      for (const blend of blends) addBlendedContexts(blend, drop.x, stepDeg, share.perp, share.par, scratch);
    });
  };

  for (const shapeRadiusUm of shapes) {
    prepared.set(shapeRadiusUm, prepare(shapeRadiusUm));
    drops.forEach((_, d) => {
      if (lastShapeOf[d] === shapeRadiusUm) compose(d);
    });
    for (const radiusUm of [...prepared.keys()]) if (lastUse.get(radiusUm)! <= shapeRadiusUm) prepared.delete(radiusUm);
  }
}

/**
 * Each drop's share of |S1|², |S2|² from each of the canting nodes asked for (indices into planeCantingNodes(spec); default:
 * all) and each order group asked for (spec.orderGroup, else every group of SHAPED_ORDER_GROUPS), weighted by the
 * node's weight, for flattened drops (a spheroid's fixed axis ratio, or equilibrium drops, each its own shape or
 * blended from shape nodes: ShapedRowSpec.deformationStep) at any wavelengths, on bins of width stepDeg centred on
 * thetaDeg (ascending, uniform): rows[drop][k] for the k-th (node, group) pair, node by node and within a node group by
 * group. Each scattering plane is traced once per shape and canting node at tracedIndices(spec), each order group's
 * orders on their own, the sweeps at the drops' own indices interpolated from those (spec.traceEveryIndex: traced at
 * each drop's index instead). Everything then scales with x (shapedPlaneRow), so drops of one shape and index share
 * one context. A (node, group) share is computed alone, so it is the same whichever other shares are computed with it:
 * kernel tasks split by canting node and order group (pipeline/kernels/canting-parts.ts) add the same numbers in the
 * same order as one task. planes counts scattering planes: a plane's groups count it once, with its first group (the
 * reflection's, which every plane has), so that a split task's parts report together what one task reports.
 */
export function shapedNodeRows(
  spec: ShapedRowSpec,
  drops: readonly ShapedDrop[],
  thetaDeg: Float64Array,
  stepDeg: number,
  nodeIndices?: readonly number[],
): { rows: { perp: Float64Array; par: Float64Array }[][]; foldsDeg: number[][]; planes: ShapedPlaneCount } {
  const allNodes = planeCantingNodes(spec);
  const groups = orderGroupsOf(spec);
  const asked = (nodeIndices ?? allNodes.map((_, k) => k)).flatMap((node) => groups.map((group) => ({ node, group })));
  const out = drops.map(() => asked.map(() => ({ perp: new Float64Array(thetaDeg.length), par: new Float64Array(thetaDeg.length) })));
  const foldsDeg = drops.map(() => asked.map(() => Number.NaN));
  const planes: ShapedPlaneCount = { traced: 0, interpolated: 0 };
  if (drops.length === 0) return { rows: out, foldsDeg, planes };
  if (spec.traceEveryIndex !== true && (spec.indexBlend ?? defaultIndexBlend(spec)) === "rows") {
    alignedNodeRows(spec, drops, thetaDeg, stepDeg, asked, out, foldsDeg, planes);
    return { rows: out, foldsDeg, planes };
  }
  // Each drop's shapes and weights; then each shape is traced once, for every drop that uses it.
  const uses = drops.map((drop) => shapesOf(spec, drop.radiusUm));
  const shapes = [...new Set(uses.flatMap((u) => u.map((s) => s.radiusUm)))].sort((a, b) => a - b);
  const plane = bowScatteringPlane(spec.sunElevationDeg, spec.arcPositionDeg);
  // Samples whose light lands more than NEAR_MARGIN_DEG to one side of the grid at every traced index are never traced again.
  const near = { loRad: (thetaDeg[0] - stepDeg / 2 - NEAR_MARGIN_DEG) * DEG, hiRad: (thetaDeg[thetaDeg.length - 1] + stepDeg / 2 + NEAR_MARGIN_DEG) * DEG };
  const rowPerp = new Float64Array(thetaDeg.length);
  const rowPar = new Float64Array(thetaDeg.length);
  for (const shapeRadiusUm of shapes) {
    const outline = outlineFor(spec, shapeRadiusUm);
    const users = drops.flatMap((drop, d) => uses[d].filter((s) => s.radiusUm === shapeRadiusUm).map((s) => ({ drop, d, weight: s.weight })));
    const indices = [...new Set(users.map((u) => u.drop.mRe))].sort((a, b) => a - b);
    const interpolate = spec.traceEveryIndex !== true;
    const traced = interpolate ? tracedIndices(spec) : indices;
    asked.forEach(({ node: nodeIndex, group }, k) => {
      const node = allNodes[nodeIndex];
      // One canting node's and group's sweeps at a time: memory stays at INDEX_NODES planes' sweeps (~14 MB), whatever the task.
      const { axis, options, sweeps } = tracedGroup(spec, node, group, outline, traced, plane, thetaDeg, stepDeg);
      if (group === 0) {
        planes.traced += traced.length;
        if (interpolate) planes.interpolated += indices.length;
      }
      for (const mRe of indices) {
        const tracer = interpolate ? shapedPlaneTracer({ outline, axis, n: mRe }, plane, options) : null;
        const at = interpolate
          ? sweeps[0].map((_, p) => (sweeps[0][p] ? interpolateSweep(sweeps.map((byOrder) => byOrder[p]!), traced, mRe, tracer!, near).sweep : null))
          : sweeps[traced.indexOf(mRe)];
        const ctx = contextFromSweeps(mRe, at, 1, thetaDeg, stepDeg, options);
        // A group of one bow order: its fold, for the canting mean (shapedMeanRows), read off the sweep also where the
        // order is ray optics alone (method "geometric": its caustic moves with the tilt as the Airy bow does). Blended
        // shapes have no one fold.
        const bowOrder = groupBowOrder(group);
        const sweep = bowOrder === undefined ? null : at[bowOrder];
        const fold = sweep ? bowFold(mRe, sweep, 1) : null;
        for (const { drop, d, weight } of users) {
          if (drop.mRe !== mRe) continue;
          foldsDeg[d][k] = fold && weight === 1 ? fold.thetaR / DEG : Number.NaN;
          shapedPlaneRow(ctx, drop.x, rowPerp, rowPar);
          const w = node.weight * weight;
          const share = out[d][k];
          for (let j = 0; j < rowPerp.length; j++) {
            share.perp[j] += w * rowPerp[j];
            share.par[j] += w * rowPar[j];
          }
        }
      }
    });
  }
  return { rows: out, foldsDeg, planes };
}

/** Whether an order group holds a bow (SHAPED_BOW_ORDERS): its canting mean is taken with the bows aligned. */
export function isBowGroup(group: number): boolean {
  return groupBowOrder(group) !== undefined;
}

/** The bow order (SHAPED_BOW_ORDERS) an order group holds, if any: each group holds at most one. */
function groupBowOrder(group: number): number | undefined {
  return SHAPED_ORDER_GROUPS[group].find((p) => (SHAPED_BOW_ORDERS as readonly number[]).includes(p));
}

/**
 * Bow groups are computed on the grid widened by this much on each side, so that the rows the canting mean shifts
 * and spreads into the grid were computed, not held at the grid's end values (lib/bow/canting-spread.ts): as far as
 * the coarse look's margin (shaped-plane-rows.ts LOOK_MARGIN_DEG). Measured with canting 7.5° (sun 10°, arcs 0°, 45°,
 * 90°): the canting nodes' folds lie within 3.2° of the upright node's for 1 mm equilibrium drops and up to 10° for
 * 1.5–2 mm. The wider grid's cost was within this machine's noise (a 1 mm drop at 5 wavelengths, widened by 0, 4, 10°).
 */
const BOW_GROUP_PAD_DEG = 10;

/**
 * The canting nodes' folds for drop d's canting mean (lib/bow/canting-spread.ts foldOverTilt). Where a node has no fold
 * at d's wavelength (its bow searched but not found as one fold), the folds of the same radius at the nearest index that
 * has them all: the mean reads only how the fold moves with the tilt, which the index barely changes, and a wavelength
 * left with its nodes' rows added as they are draws each node's bow sharp in that colour alone (a coloured line; 2 mm
 * drops at the side of the bow: 4 of 82 primary-bow means, the blue end, before this).
 */
export function cantingFolds(foldsDeg: readonly (readonly number[])[], drops: readonly ShapedDrop[], d: number, nodeCount: number, shareOf: readonly number[]): number[] {
  const at = (e: number) => Array.from({ length: nodeCount }, (_, k) => foldsDeg[e][shareOf[k]]);
  const own = at(d);
  if (own.every(Number.isFinite)) return own;
  let best = -1;
  drops.forEach((drop, e) => {
    if (drop.radiusUm !== drops[d].radiusUm || !at(e).every(Number.isFinite)) return;
    if (best < 0 || Math.abs(drop.mRe - drops[d].mRe) < Math.abs(drops[best].mRe - drops[d].mRe)) best = e;
  });
  return best < 0 ? own : at(best);
}

/**
 * How a bow group's canting nodes are averaged: "spread", each node's bow spread over the folds of its own cell of tilts
 * (lib/bow/canting-spread.ts, the service's); "nodes", the nodes' rows added as they are (the rule alone: what
 * bench/canting-spread.ts compares it with).
 */
export type CantingMean = "spread" | "nodes";

/**
 * Each drop's |S1|², |S2|² as pieces to be added in order: per order group asked for (spec.orderGroup, else all), the
 * group without a bow (reflection and transmission) node by node as shapedNodeRows gives it, each bow group as one
 * canting mean with each node's bow spread over the folds of its cell of tilts (cantingMean; where the folds make no
 * model, e.g. method "geometric" or a bow off the grid, its nodes' shares added as they are). Kernel tasks split in
 * parts (pipeline/kernels/canting-parts.ts) compute the same pieces, the group without a bow node by node.
 */
export function shapedMeanRows(
  spec: ShapedRowSpec,
  drops: readonly ShapedDrop[],
  thetaDeg: Float64Array,
  stepDeg: number,
  cantingMean: CantingMean = "spread",
): { pieces: { perp: Float64Array; par: Float64Array }[][]; planes: ShapedPlaneCount } {
  const pieces = drops.map((): { perp: Float64Array; par: Float64Array }[] => []);
  const planes: ShapedPlaneCount = { traced: 0, interpolated: 0 };
  const count = thetaDeg.length;
  const pad = Math.round(BOW_GROUP_PAD_DEG / stepDeg);
  const padded = paddedGrid(thetaDeg, stepDeg, pad);
  const { rule, nodes: planeNodes, of: shareOf } = planeCantingRule(spec);
  const nodes = rule.nodes;
  for (const group of orderGroupsOf(spec)) {
    const bow = isBowGroup(group);
    const computed = shapedNodeRows({ ...spec, orderGroup: group }, drops, bow ? padded : thetaDeg, stepDeg);
    planes.traced += computed.planes.traced;
    planes.interpolated += computed.planes.interpolated;
    computed.rows.forEach((shares, d) => {
      if (!bow) {
        pieces[d].push(...shares);
        return;
      }
      const perp = new Float64Array(count + 2 * pad);
      const par = new Float64Array(count + 2 * pad);
      const folds = cantingFolds(computed.foldsDeg, drops, d, nodes.length, shareOf);
      const out = { perp, par };
      const spread =
        planeNodes.length > 1 &&
        cantingMean === "spread" &&
        (rule.banded
          ? bandedCantingMean(shares, shareOf, rule.banded, folds, spec.cantingSdDeg, stepDeg, out)
          : localCantingMean(shares, shareOf, nodes, folds, spec.cantingSdDeg, stepDeg, out));
      if (!spread) {
        perp.fill(0);
        par.fill(0);
        for (const share of shares) {
          for (let j = 0; j < perp.length; j++) {
            perp[j] += share.perp[j];
            par[j] += share.par[j];
          }
        }
      }
      pieces[d].push({ perp: perp.slice(pad, pad + count), par: par.slice(pad, pad + count) });
    });
  }
  return { pieces, planes };
}

/**
 * The canting mean by rotation (ShapedRowSpec.cantingRotation) of drops of one shape at their wavelengths: one piece per
 * drop with every order, over the relative sun elevations of `slice` of ROTATION_SLICES (all when undefined; a kernel
 * task split in parts, pipeline/kernels/canting-parts.ts, adds the slices' pieces in order, as this does).
 */
export function rotationMeanRows(
  spec: ShapedRowSpec,
  drops: readonly ShapedDrop[],
  thetaDeg: Float64Array,
  stepDeg: number,
  slice?: number,
): { pieces: { perp: Float64Array; par: Float64Array }[][]; planes: ShapedPlaneCount; siblings: { arcPositionDeg: number; pieces: { perp: Float64Array; par: Float64Array }[][] }[] } {
  const setup = {
    outline: outlineFor(spec, drops[0].radiusUm),
    sunElevationDeg: spec.sunElevationDeg,
    cantingSdDeg: spec.cantingSdDeg,
    arcPositionDeg: spec.arcPositionDeg,
    indexSpan: spec.indexSpan ?? WATER_INDEX_RANGE,
    grid: spec.rotationGrid,
    rayOnly: spec.rayOnly,
  };
  if (drops.some((d) => d.radiusUm !== drops[0].radiusUm) && spec.kind !== "spheroid") throw new RangeError("the canting mean by rotation takes drops of one shape");
  const siblingArcs = (spec.siblingArcsDeg ?? []).filter((a) => a !== spec.arcPositionDeg);
  const arcs = [spec.arcPositionDeg, ...siblingArcs];
  const slices = slice === undefined ? Array.from({ length: ROTATION_SLICES }, (_, k) => k) : [slice];
  const pieces = arcs.map(() => drops.map((): { perp: Float64Array; par: Float64Array }[] => []));
  for (const k of slices) rotationCantingRowsAlong(setup, arcs, drops, thetaDeg, stepDeg, k).forEach((arcRows, a) => arcRows.forEach((row, d) => pieces[a][d].push(row)));
  return {
    pieces: pieces[0],
    planes: { traced: 0, interpolated: 0 },
    siblings: siblingArcs.map((arcPositionDeg, k) => ({ arcPositionDeg, pieces: pieces[k + 1] })),
  };
}

/** The canting mean of |S1|², |S2|² (shapedMeanRows' pieces added in their order). */
export function shapedRows(
  spec: ShapedRowSpec,
  drops: readonly ShapedDrop[],
  thetaDeg: Float64Array,
  stepDeg: number,
  cantingMean: CantingMean = "spread",
): { perp: Float64Array; par: Float64Array }[] {
  const mean = spec.cantingRotation ? rotationMeanRows(spec, drops, thetaDeg, stepDeg) : shapedMeanRows(spec, drops, thetaDeg, stepDeg, cantingMean);
  return mean.pieces.map((shares) => {
    const perp = new Float64Array(thetaDeg.length);
    const par = new Float64Array(thetaDeg.length);
    for (const share of shares) {
      for (let j = 0; j < perp.length; j++) {
        perp[j] += share.perp[j];
        par[j] += share.par[j];
      }
    }
    return { perp, par };
  });
}

/** One drop's row (shapedRows for a single drop), written into perp and par. */
export function shapedDropRow(
  spec: ShapedRowSpec,
  mRe: number,
  x: number,
  radiusUm: number,
  thetaDeg: Float64Array,
  stepDeg: number,
  perp: Float64Array,
  par: Float64Array,
): void {
  const [row] = shapedRows(spec, [{ radiusUm, mRe, x }], thetaDeg, stepDeg);
  perp.set(row.perp);
  par.set(row.par);
}
