// |S1|², |S2|² of one drop of any axisymmetric shape in one scattering half-plane, for any size: everything is
// prepared once per shape, orientation and wavelength and scales with the size parameter x as for spheres
// (ray optics ∝ x², the bows through lib/bow/airy-bins.ts's addUniformBowBins).

import { PlaneTracer, sweepPlane, type PlaneSweep, type ScatteringPlane, type SweepWindow } from "../rays/plane-sweep.js";
import { sweepPlaneCoarse } from "../rays/coarse-sweep.js";
import type { DropTraceSetup } from "../rays/shape-tracer.js";
import { addUniformBowBins, type UniformBowTable } from "./airy-bins.js";
import { planeBowTable, type FoldConstants, type PlaneFold } from "./plane-bow-table.js";
import { planeRayBins } from "./plane-ray-bins.js";
import { sweepBranches } from "../rays/lost-roots.js";
import type { RayBins } from "./ray-bins.js";
import { offMirrorAxis } from "./off-mirror-axis.js";
// The cell [u[s], u[s + 1]] of ascending pupil samples that holds u.
import { bracket } from "../spectra/spectrum.js";

/** Orders carried: reflection and transmission as ray optics, the primary and secondary bows in uniform form. */
export const SHAPED_RAY_ORDERS = [0, 1] as const;
export const SHAPED_BOW_ORDERS = [2, 3] as const;
/** Pupil samples on each side of the axis per order: as lib/bow/ray-bins.ts's SEGMENTS for spheres (error ~ segment²). */
export const SHAPED_HALF_SEGMENTS = 4000;
/**
 * Every this many pupil samples is traced, the others filled by cubics where trusted (lib/rays/coarse-sweep.ts).
 * Measured on one plane of 1 mm (top of the bow, upright and canted 13°; arc 45°) and 2–2.5 mm equilibrium drops
 * (bench/plane-trace.ts and test/lib/rays/coarse-sweep.test.ts): traces 0.25–0.49 of a full sweep's at 8, 0.22–0.50 at 16
 * and 32, every sample within the tolerances and the same rays found at 8 and 16; at 32 two rays at a run's end were
 * lost, moving a bin by 1.8 % of the peak.
 */
export const SHAPED_COARSE_STEP = 8;
/**
 * A coarse look first (64 samples a side): an order whose light stays more than LOOK_MARGIN_DEG away from the grid
 * is not swept (the primary's window never sees the transmitted light, Θ < 83° for spheres). 10° is more than Θ
 * turns between the last coarse sample (b = 0.9997, incidence 88.6°) and grazing (about 2·1.4° per chord for spheres).
 */
const LOOK_HALF_SEGMENTS = 64;
const LOOK_MARGIN_DEG = 10;
/**
 * Branches (other roots of v*(u): lib/rays/lost-roots.ts) are followed while their rays land within this of the grid:
 * a segment reaches into the grid from a ray at most one pupil sample's turn of Θ outside it, hundredths of a degree
 * away from grazing (the same margin as lib/bow/shaped-rows.ts NEAR_MARGIN_DEG, with its measurement).
 */
const BRANCH_MARGIN_DEG = 2;
/**
 * The look's searches end at a Newton step below this (PlaneTracer.planeRay's accept), the ray carried to first order:
 * Θ is then off by ~½Θ_vv·1e-8 rad, nothing beside LOOK_MARGIN_DEG, and v serves only as a search's start.
 */
const LOOK_ACCEPT = 1e-4;

/**
 * Where the coarse sweep's light lands within LOOK_MARGIN_DEG of the grid in this half-plane: the part of the pupil the
 * full sweep traces (null if none). A coarse cell is wanted when a ray at either end lands there, when its two rays
 * span the grid, or where the order starts or stops leaving the drop (rim, total reflection), and so are its
 * neighbours; the rest of the pupil sends its light of this order ≥ LOOK_MARGIN_DEG away from the grid.
 */
function lookWindow(tracer: PlaneTracer, p: number, side: 1 | -1, thetaDeg: Float64Array, stepDeg: number): LookCells | null {
  const look = sweepPlane(tracer, p, LOOK_HALF_SEGMENTS, undefined, LOOK_ACCEPT);
  const lo = (thetaDeg[0] - stepDeg / 2 - LOOK_MARGIN_DEG) * DEG;
  const hi = (thetaDeg[thetaDeg.length - 1] + stepDeg / 2 + LOOK_MARGIN_DEG) * DEG;
  const count = look.u.length;
  const mark = new Uint8Array(count);
  const theta = (s: number) => side * look.thetaSigned[s];
  let any = false;
  for (let s = 0; s < count; s++) {
    if (look.ok[s] && theta(s) >= lo && theta(s) <= hi) {
      mark[s] = 1;
      any = true;
    }
    if (s + 1 < count && look.ok[s] !== look.ok[s + 1]) mark[s] = mark[s + 1] = 1;
    if (s + 1 < count && look.ok[s] && look.ok[s + 1] && Math.min(theta(s), theta(s + 1)) <= lo && Math.max(theta(s), theta(s + 1)) >= hi) {
      mark[s] = mark[s + 1] = 1;
      any = true;
    }
  }
  if (!any) return null;
  const wanted = Uint8Array.from(mark, (m, s) => (m || mark[s - 1] || mark[s + 1] ? 1 : 0));
  const guess = (u: number): number => {
    const s = bracket(look.u, u);
    const near = Math.abs(look.u[s + 1] - u) < Math.abs(u - look.u[s]) ? s + 1 : s;
    return look.ok[near] ? look.v[near] : look.ok[s] ? look.v[s] : look.v[s + 1];
  };
  return { u: look.u, wanted, guess };
}

/** The look's samples, the cells between them the full sweep traces (wanted[s] or wanted[s + 1]), and the window's guess. */
interface LookCells {
  u: Float64Array;
  wanted: Uint8Array;
  guess: (u: number) => number;
}

/**
 * The window of the looks' union (a sample any look wants), with own's guess. Every tracer of a plane looks at the same
 * samples (the pupil's half-width does not depend on n), so the union is one array of marks; looks at other samples
 * (not made by shapedPlaneSweeps) are asked one by one.
 */
function unionWindow(looks: LookCells[], own: LookCells): SweepWindow {
  const first = looks[0];
  const shared = looks.every((l) => l.u.length === first.u.length && l.u.every((u, s) => u === first.u[s]));
  const wantedAt = (l: LookCells, u: number) => {
    const s = bracket(l.u, u);
    return l.wanted[s] === 1 || l.wanted[s + 1] === 1;
  };
  if (!shared) return { wants: (u) => looks.some((l) => wantedAt(l, u)), guess: own.guess };
  const wanted = first.wanted.map((_, s) => (looks.some((l) => l.wanted[s] === 1) ? 1 : 0));
  const union = { u: first.u, wanted, guess: own.guess };
  return { wants: (u) => wantedAt(union, u), guess: own.guess };
}

const DEG = Math.PI / 180;

export interface ShapedPlaneContext {
  /** What scales as x²: ray optics of the orders without a bow, and of the bow orders where their table does not serve. */
  raysPerX2: RayBins;
  bowTables: UniformBowTable[];
  /** The folds found (geometric bow angles of this half-plane), by order, with their uniform-form constants. */
  folds: { order: number; fold: PlaneFold; constants: FoldConstants }[];
}

export interface ShapedPlaneOptions {
  halfSegments?: number;
  /** 1: every pupil sample traced; else every coarseStep-th, the rest filled where trusted (SHAPED_COARSE_STEP). */
  coarseStep?: number;
  /** False: sweep the whole pupil, not only where the coarse look sends light near the grid (for tests). */
  windowed?: boolean;
  rayOrders?: readonly number[];
  bowOrders?: readonly number[];
}

/** Θ ascending and evenly spaced by stepDeg; values are bin means. side: +1 the half-plane towards plane.e. */
export function shapedPlaneContext(
  setup: Omit<DropTraceSetup, "maxOrder" | "absorptionPerRadius">,
  plane: ScatteringPlane,
  side: 1 | -1,
  thetaDeg: Float64Array,
  stepDeg: number,
  options: ShapedPlaneOptions = {},
): ShapedPlaneContext {
  const sweeps = shapedPlaneSweeps([setup], plane, side, thetaDeg, stepDeg, options)[0];
  return contextFromSweeps(setup.n, sweeps, side, thetaDeg, stepDeg, options);
}

/** The orders a context carries, as asked for (defaults: SHAPED_RAY_ORDERS, SHAPED_BOW_ORDERS). */
function ordersOf(options: ShapedPlaneOptions): { rayOrders: readonly number[]; bowOrders: readonly number[] } {
  return { rayOrders: options.rayOrders ?? SHAPED_RAY_ORDERS, bowOrders: options.bowOrders ?? SHAPED_BOW_ORDERS };
}

/**
 * The sweeps of every order a context needs, for one drop outline and orientation at several refractive indices
 * (setups differ only in n): sweeps[setup][order] (null where the order sends no light near the grid). Every setup
 * traces the same pupil samples, those any of them wants (the union of their coarse looks), so that the sweeps can
 * be interpolated across n sample by sample (lib/rays/sweep-interpolation.ts).
 */
export function shapedPlaneSweeps(
  setups: Omit<DropTraceSetup, "maxOrder" | "absorptionPerRadius">[],
  plane: ScatteringPlane,
  side: 1 | -1,
  thetaDeg: Float64Array,
  stepDeg: number,
  options: ShapedPlaneOptions = {},
): (PlaneSweep | null)[][] {
  const { rayOrders, bowOrders } = ordersOf(options);
  const halfSegments = options.halfSegments ?? SHAPED_HALF_SEGMENTS;
  const windowed = options.windowed ?? true;
  const coarseStep = options.coarseStep ?? SHAPED_COARSE_STEP;
  const maxOrder = Math.max(...rayOrders, ...bowOrders);
  // An axis in the plane makes it a mirror plane, whose sweeps miss roots: off-mirror-axis.ts.
  const tracers = setups.map((setup) => shapedPlaneTracer({ ...setup, axis: offMirrorAxis(setup.axis, plane) }, plane, options));
  const branchesNear = { loRad: (thetaDeg[0] - stepDeg / 2 - BRANCH_MARGIN_DEG) * DEG, hiRad: (thetaDeg[thetaDeg.length - 1] + stepDeg / 2 + BRANCH_MARGIN_DEG) * DEG, side };
  const sweeps: (PlaneSweep | null)[][] = tracers.map(() => []);
  for (let p = 0; p <= maxOrder; p++) {
    if (!rayOrders.includes(p) && !bowOrders.includes(p)) continue;
    const windows = tracers.map((tracer) => lookWindow(tracer, p, side, thetaDeg, stepDeg));
    const any = windows.filter((w): w is LookCells => w !== null);
    tracers.forEach((tracer, k) => {
      if (any.length === 0) {
        sweeps[k][p] = null;
        return;
      }
      const union = unionWindow(any, windows[k] ?? any[0]);
      const window = windowed ? union : undefined;
      const sweep = coarseStep > 1 ? sweepPlaneCoarse(tracer, p, halfSegments, coarseStep, window) : sweepPlane(tracer, p, halfSegments, window);
      sweep.branches = sweepBranches(tracer, sweep, windowed ? branchesNear : undefined);
      sweeps[k][p] = sweep;
    });
  }
  return sweeps;
}

/** The tracer of one plane through one drop, up to the highest order the options ask for. */
export function shapedPlaneTracer(
  setup: Omit<DropTraceSetup, "maxOrder" | "absorptionPerRadius">,
  plane: ScatteringPlane,
  options: ShapedPlaneOptions = {},
): PlaneTracer {
  const { rayOrders, bowOrders } = ordersOf(options);
  // Absorption is left out, as in the sphere engines (lib/rays/fresnel.ts pathTransmittance): it would break the
  // scaling with x; for water in the visible 2κx·(path ≈ 4a) stays below 1 % up to 3 mm drops (κ ≤ 3e-8).
  return new PlaneTracer({ ...setup, maxOrder: Math.max(...rayOrders, ...bowOrders), absorptionPerRadius: 0 }, plane);
}

/** A context from the sweeps of shapedPlaneSweeps (or sweeps interpolated from them) at refractive index n. */
export function contextFromSweeps(
  n: number,
  sweeps: (PlaneSweep | null)[],
  side: 1 | -1,
  thetaDeg: Float64Array,
  stepDeg: number,
  options: ShapedPlaneOptions = {},
): ShapedPlaneContext {
  const { rayOrders, bowOrders } = ordersOf(options);
  const count = thetaDeg.length;
  const raysPerX2: RayBins = { perpendicular: new Float64Array(count), parallel: new Float64Array(count) };
  for (const p of rayOrders) {
    const sweep = sweeps[p];
    if (sweep) planeRayBins(sweep, side, thetaDeg, stepDeg, undefined, raysPerX2);
  }
  // Other roots of v*(u) beyond folds of it (lib/rays/fold-back.ts): ray optics wherever they land, every order.
  for (const p of [...rayOrders, ...bowOrders]) {
    for (const branch of sweeps[p]?.branches ?? []) planeRayBins(branch, side, thetaDeg, stepDeg, undefined, raysPerX2);
  }
  const bowTables: UniformBowTable[] = [];
  const folds: ShapedPlaneContext["folds"] = [];
  for (const p of bowOrders) {
    const sweep = sweeps[p];
    if (!sweep) continue;
    const bow = planeBowTable({ setup: { n } }, sweep, side, thetaDeg, stepDeg);
    if (bow === null) {
      planeRayBins(sweep, side, thetaDeg, stepDeg, undefined, raysPerX2);
      continue;
    }
    folds.push({ order: p, fold: bow.fold, constants: bow.constants });
    const others = planeRayBins(sweep, side, thetaDeg, stepDeg, bow.pairSegments);
    const all = bow.table.uniform.every((u) => u === 1) ? null : planeRayBins(sweep, side, thetaDeg, stepDeg);
    for (let j = 0; j < count; j++) {
      const source = bow.table.uniform[j] ? others : all!;
      raysPerX2.perpendicular[j] += source.perpendicular[j];
      raysPerX2.parallel[j] += source.parallel[j];
    }
    if (bow.table.uniform.some((u) => u === 1)) bowTables.push(bow.table);
  }
  return { raysPerX2, bowTables, folds };
}

/** Writes |S1|², |S2|² (Bohren–Huffman convention) of size parameter x (2π a/λ, a the equal-volume radius). */
export function shapedPlaneRow(ctx: ShapedPlaneContext, x: number, perp: Float64Array, par: Float64Array): void {
  const x2 = x * x;
  for (let j = 0; j < perp.length; j++) {
    perp[j] = x2 * ctx.raysPerX2.perpendicular[j];
    par[j] = x2 * ctx.raysPerX2.parallel[j];
  }
  for (const table of ctx.bowTables) addUniformBowBins(table, x, 1, perp, par);
}
