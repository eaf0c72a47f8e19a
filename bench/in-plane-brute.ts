// Brute force over the pupil: the light of one order that a drop sends into a scattering plane, from every ray of a
// grid over a strip of the pupil, those leaving within |Y| < δ of the plane binned by Θ, each carrying its power ×
// du·dv, over 2δ × the bin: power per unit Θ and unit Y, the units of a sweep's ray bins (|A|²/|∂(Θ,Y)/∂(u,v)| summed
// over rays, van de Hulst 1957 §12.22). It sees every root of v*(u), where a sweep follows one (lib/rays/plane-sweep.ts).
// Used by bench/in-plane-rays.ts and test/lib/rays/fold-back.test.ts.

import { shapedPlaneTracer } from "../lib/bow/shaped-plane-rows.js";
import type { PlaneSweep, ScatteringPlane } from "../lib/rays/plane-sweep.js";
import { planeRayBins } from "../lib/bow/plane-ray-bins.js";
import type { DropTraceSetup } from "../lib/rays/shape-tracer.js";
import { AT, ORDER_STRIDE } from "../lib/rays/shape-tracer.js";

const DEG = Math.PI / 180;

export interface BruteForceGrid {
  uFrom: number;
  uTo: number;
  /** |v| up to this (units of a): past the widest drop the service traces. */
  vReach: number;
  du: number;
  dv: number;
  /** Half-width of the slab about the plane, in Y = d_out·N. */
  delta: number;
}

/**
 * The power a traced ray carries out in the order at `base` (p·ORDER_STRIDE of a trace's record): both incident
 * polarisations' outgoing fields, a sweep's ⟂ + ∥ with co- and cross-polar parts.
 */
export function tracedPower(rec: ArrayLike<number>, base: number): number {
  let power = 0;
  for (const at of [AT.e1Re, AT.e1Im, AT.e2Re, AT.e2Im]) for (let c = 0; c < 3; c++) power += rec[base + at + c] ** 2;
  return power;
}

/** Power per unit Θ (radians) and Y of order p in bins of binDeg from fromDeg (count bins), half-plane Θ > 0. */
export function bruteForceInPlane(
  setup: Omit<DropTraceSetup, "maxOrder" | "absorptionPerRadius">,
  plane: ScatteringPlane,
  p: number,
  grid: BruteForceGrid,
  fromDeg: number,
  binDeg: number,
  count: number,
): Float64Array {
  const tracer = shapedPlaneTracer(setup, plane, { rayOrders: [], bowOrders: [p] });
  const bins = new Float64Array(count);
  const base = p * ORDER_STRIDE;
  for (let u = grid.uFrom + grid.du / 2; u < grid.uTo; u += grid.du) {
    for (let v = -grid.vReach; v < grid.vReach; v += grid.dv) {
      if (!tracer.traceAt(u, v, p)) continue;
      const { y, thetaSigned } = tracer.lastExit(p);
      if (Math.abs(y) >= grid.delta) continue;
      const thetaDeg = thetaSigned / DEG;
      const j = Math.floor((thetaDeg - fromDeg) / binDeg);
      if (j < 0 || j >= count) continue;
      bins[j] += (tracedPower(tracer.lastTrace.orders, base) * grid.du * grid.dv) / (2 * grid.delta * binDeg * DEG);
    }
  }
  return bins;
}

/**
 * A sweep's light on the same bins from its samples within the strip [uFrom, uTo] (the brute force's), |S|² per unit Θ
 * and Y summed over ⟂ and ∥; withBranches: and its branches' (PlaneSweep.branches: the bridges across folds, which have
 * pupil steps of their own, whole).
 */
export function sweptInPlane(sweep: PlaneSweep, uFrom: number, uTo: number, fromDeg: number, binDeg: number, count: number, withBranches: boolean): Float64Array {
  const bins = Float64Array.from({ length: count }, (_, j) => fromDeg + binDeg * (j + 0.5));
  const outside = Uint8Array.from(sweep.u, (u, s) => (u >= uFrom && s + 1 < sweep.u.length && sweep.u[s + 1] <= uTo ? 0 : 1));
  const out = planeRayBins(sweep, 1, bins, binDeg, outside);
  if (withBranches) {
    for (const branch of sweep.branches ?? []) planeRayBins(branch, 1, bins, binDeg, branch.u === sweep.u ? outside : undefined, out);
  }
  return Float64Array.from(out.perpendicular, (v, j) => v + out.parallel[j]);
}
