// |S1|², |S2|² of one flattened drop at one wavelength and one place on the bow, averaged over the drops'
// canting: the engine behind kernel rows for drops that are not spheres (lib/bow/kernel-rows.ts).

import { equilibriumOutline } from "../drops/shape/equilibrium-shape.js";
import { spheroidOutline, type DropOutline } from "../drops/shape/outline.js";
import { shapeNodeWeights } from "../drops/shape/shape-nodes.js";
import { bowScatteringPlane, cantedAxis } from "../rays/bow-geometry.js";
import { planeCantingNodeOf, planeCantingNodes } from "./plane-canting-nodes.js";
import { localCantingMean } from "./canting-spread.js";
import { cantingNodesFive } from "../drops/shape/canting.js";
import { chebyshevNodes, interpolateSweep } from "../rays/sweep-interpolation.js";
import { WATER_INDEX_RANGE } from "../water/index-range.js";
import {
  contextFromSweeps,
  SHAPED_BOW_ORDERS,
  SHAPED_RAY_ORDERS,
  shapedPlaneRow,
  shapedPlaneSweeps,
  shapedPlaneTracer,
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
 * per 0.25° of elevation; 0.07–0.23 on average: not below 0.5 at worst. The finer arc step costs no work: a request's rows are
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
   * apart in deformation 1 − q that bracket its shape (lib/drops/shape/shape-nodes.ts), so that radii share traced
   * planes; 0 or absent (what the service asks for: the colour this costs is measured in BENCHMARKS.md, shape-nodes):
   * every radius its own shape.
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
}

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
 * Version of the flattened-drop engine's numbers, in its rows' cache keys: raised when they change (9: ∂Y/∂v from each
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
export const SHAPED_ENGINE_VERSION = 9;

/** The part of a kernel row's cache key that tells what shape and geometry it was computed for. */
export function shapedRowKey(spec: ShapedRowSpec): string {
  const shape = spec.kind === "spheroid" ? `q${spec.axisRatio}` : spec.deformationStep ? `eq${spec.deformationStep}` : "eq";
  const direct = spec.traceEveryIndex ? ":direct" : "";
  const span = spec.indexSpan ? `:n${spec.indexSpan.min}-${spec.indexSpan.max}` : "";
  // A group's share is not a row: it never shares a key with one.
  const group = spec.orderGroup === undefined ? "" : `:g${spec.orderGroup}`;
  return `shape${SHAPED_ENGINE_VERSION}:${shape}:c${spec.cantingSdDeg}:s${spec.sunElevationDeg}:a${spec.arcPositionDeg}:${spec.rayOnly ? "rays" : "airy"}${span}${direct}${group}`;
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
  return spec.deformationStep ? `${shapedRowKey(spec)}|nodes` : `${shapedRowKey(spec)}|${radiusUm}`;
}

/** The shapes (by the radius whose outline they are; a spheroid's: 0) a drop's row is made of, and their weights. */
function shapesOf(spec: ShapedRowSpec, radiusUm: number): { radiusUm: number; weight: number }[] {
  return spec.kind === "spheroid" ? [{ radiusUm: 0, weight: 1 }] : shapeNodeWeights(radiusUm, spec.deformationStep ?? 0);
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

/** Scattering planes a computation traced and interpolated across the index (what the cost estimates count). */
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
      const axis = cantedAxis(node.tiltXDeg, node.tiltYDeg);
      const options = groupOptions(spec, group);
      // One canting node's and group's sweeps at a time: memory stays at INDEX_NODES planes' sweeps (~14 MB), whatever the task.
      const sweeps = shapedPlaneSweeps(traced.map((n) => ({ outline, axis, n })), plane, 1, thetaDeg, stepDeg, options);
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
        // A group of one bow order: its fold, for the canting mean (shapedMeanRows). Blended shapes have no one fold.
        const fold = options.bowOrders?.length === 1 ? ctx.folds.find((f) => f.order === options.bowOrders![0]) : undefined;
        for (const { drop, d, weight } of users) {
          if (drop.mRe !== mRe) continue;
          foldsDeg[d][k] = fold && weight === 1 ? fold.fold.thetaR / DEG : Number.NaN;
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
  return SHAPED_ORDER_GROUPS[group].some((p) => (SHAPED_BOW_ORDERS as readonly number[]).includes(p));
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
  const padded = Float64Array.from({ length: count + 2 * pad }, (_, j) => thetaDeg[0] + (j - pad) * stepDeg);
  const nodes = cantingNodesFive(spec.cantingSdDeg);
  const planeNodes = planeCantingNodes(spec);
  const shareOf = planeCantingNodeOf(spec);
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
      const folds = nodes.map((_, k) => computed.foldsDeg[d][shareOf[k]]);
      const mean = (pick: "perp" | "par", out: Float64Array) =>
        planeNodes.length > 1 && cantingMean === "spread" && localCantingMean(shares.map((s) => s[pick]), shareOf, nodes, folds, spec.cantingSdDeg, stepDeg, out);
      if (!(mean("perp", perp) && mean("par", par))) {
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

/** The canting mean of |S1|², |S2|² (shapedMeanRows' pieces added in their order). */
export function shapedRows(spec: ShapedRowSpec, drops: readonly ShapedDrop[], thetaDeg: Float64Array, stepDeg: number): { perp: Float64Array; par: Float64Array }[] {
  return shapedMeanRows(spec, drops, thetaDeg, stepDeg).pieces.map((shares) => {
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
