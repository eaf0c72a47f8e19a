// The second branch of the in-plane offset v*(u) where a sweep's run of rays ends at a fold of it. A sweep
// (lib/rays/plane-sweep.ts) follows one root v*(u) of Y(u, v) = 0 from sample to sample. Where ∂Y/∂v → 0 the root
// meets a second one and both end: near such a point Y ≈ Y_u(u − u_f) + ½Y_vv(v − v_f)², so the two roots are
// v_f ± √(−2Y_u(u − u_f)/Y_vv), on the same side of u_f (a fold of the curve Y = 0: common practice of continuation
// methods), and each ray's power per unit u, |A|²/|∂Y/∂v|, climbs towards it. The sweep keeps the first root only; the
// second leaves in the same plane too and carries light of its own (bench/in-plane-rays.ts: 1.5 mm equilibrium drops
// at the side of the bow, Θ 145.6–150.1°, as bright as the primary's inner side). Here each run end whose power climbs
// over its last samples has the other root found at that sample (predicted from the first's ∂Y/∂v and ∂²Y/∂v², else a
// scan of Y along v, then Newton's search) and followed back into the run's samples until the search loses it or it
// meets the first root again.

import { RayPredictor, emptySweep, type NearAngles, type PlaneSweep, type PlaneTracer } from "./plane-sweep.js";
import { followRoot, onKnown, SAME_ROOT } from "./follow-root.js";

/** A run end counts as a fold when its power per unit u grew over each of its last CLIMB_SAMPLES steps. */
const CLIMB_SAMPLES = 3;
/** The scan for the second root: this many traces over ±SCAN_REACH (units of a) of v about the first root. */
const SCAN_TRACES = 48;
const SCAN_REACH = 0.25;

/** A sample's power per unit u, both polarisations (PlaneSweep.perpPerU + parPerU). */
function powerAt(sweep: PlaneSweep, s: number): number {
  return sweep.perpPerU[s] + sweep.parPerU[s];
}

/** The step in v (units of a) over which ∂Y/∂v is differenced for ∂²Y/∂v² at a run's end (foldPartner). */
const CURVATURE_STEP = 1e-4;

/**
 * The fold's other root at u from the first root's ∂Y/∂v and ∂²Y/∂v² (the normal form above: the two roots lie
 * symmetrically about v_f = v₁ − Y_v/Y_vv, so v₂ ≈ v₁ − 2Y_v/Y_vv), then planeRay's search from there; null where that
 * finds no root apart from vFirst. Near the fold the roots are closer than any fixed scan's step (1.5 mm drops at arc
 * 97.5°, sun 10°: 0.009 of a apart at the run's last sample, against the scan's 0.0104): this finds them at any spacing.
 */
function foldPartner(tracer: PlaneTracer, u: number, vFirst: number, p: number): number | null {
  if (!tracer.traceAt(u, vFirst, p)) return null;
  const yvFirst = tracer.lastExit(p).yv;
  if (!tracer.traceAt(u, vFirst + CURVATURE_STEP, p)) return null;
  const yvv = (tracer.lastExit(p).yv - yvFirst) / CURVATURE_STEP;
  if (!(Math.abs(yvv) > 0)) return null;
  const ray = tracer.planeRay(u, vFirst - (2 * yvFirst) / yvv, p);
  return ray !== null && Math.abs(ray.v - vFirst) > SAME_ROOT ? ray.v : null;
}

/**
 * The root of Y(v) at u nearest vFirst other than vFirst itself: the fold's partner (foldPartner), else a sign change of
 * Y in a scan then planeRay; null if neither finds one.
 */
function secondRoot(tracer: PlaneTracer, u: number, vFirst: number, p: number): number | null {
  const partner = foldPartner(tracer, u, vFirst, p);
  if (partner !== null) return partner;
  let best: number | null = null;
  let previousV = Number.NaN;
  let previousY = Number.NaN;
  for (let k = 0; k <= SCAN_TRACES; k++) {
    const v = vFirst - SCAN_REACH + (2 * SCAN_REACH * k) / SCAN_TRACES;
    if (!tracer.traceAt(u, v, p)) {
      previousV = Number.NaN;
      continue;
    }
    const { y } = tracer.lastExit(p);
    if (!Number.isNaN(previousV) && Math.sign(y) !== Math.sign(previousY)) {
      const ray = tracer.planeRay(u, 0.5 * (v + previousV), p);
      if (ray !== null && Math.abs(ray.v - vFirst) > SAME_ROOT && (best === null || Math.abs(ray.v - vFirst) < Math.abs(best - vFirst))) best = ray.v;
    }
    previousV = v;
    previousY = y;
  }
  return best;
}

/** How many folds deep branches are followed (a branch may end at a fold of its own). */
const MAX_DEPTH = 3;

/**
 * The second branches of sweep's runs that end at a fold of v*(u), and theirs in turn (MAX_DEPTH): each a sweep over the
 * same samples (ok only where the branch was found), and a bridge across each fold. The last traced rays of the two
 * roots lie a little short of the fold u_f, on either side of its angle Θ_f; with P ∝ 1/√(u_f − u) and Θ − Θ_f ∝
 * ±√(u_f − u) on each (the fold's normal form above), P·du is even in Θ between them: the bridge is a two-sample sweep
 * from one root's last ray to the other's carrying that power (bridge), u_f from the 1/P² law through the run's last
 * two rays. near: where branches are followed (their rays' Θ).
 */
export function foldBackBranches(tracer: PlaneTracer, sweep: PlaneSweep, near?: NearAngles, depth = 1, known: PlaneSweep[] = [sweep]): PlaneSweep[] {
  const p = sweep.order;
  const count = sweep.u.length;
  const found: PlaneSweep[] = [];
  for (let end = 0; end < count; end++) {
    if (!sweep.ok[end]) continue;
    for (const out of [1, -1] as const) {
      const beyond = end + out;
      if (beyond < 0 || beyond >= count || sweep.ok[beyond]) continue;
      // The run behind the end: climbing power over its last samples.
      let climbing = true;
      for (let k = 0; k < CLIMB_SAMPLES && climbing; k++) {
        const a = end - out * k;
        const b = a - out;
        climbing = b >= 0 && b < count && sweep.ok[a] === 1 && sweep.ok[b] === 1 && powerAt(sweep, a) > powerAt(sweep, b);
      }
      if (!climbing) continue;
      const start = secondRoot(tracer, sweep.u[end], sweep.v[end], p);
      // A root some sweep already follows (a branch's fold back onto the run it came from) is not a new branch.
      if (start === null || onKnown(known, end, start)) continue;
      const branch = followBranch(tracer, known, p, end, -out as 1 | -1, start, near);
      if (branch === null || !branch.ok[end]) continue;
      known.push(branch);
      found.push(branch, bridge(sweep, branch, end, end - out));
      if (depth < MAX_DEPTH) found.push(...foldBackBranches(tracer, branch, near, depth + 1, known));
    }
  }
  return found;
}

/**
 * The two-sample sweep across the fold between sweep's and branch's rays at sample end (previous: the sample before it
 * on both). With P = A/√(u_f − u) on each root, the power from the previous sample to the fold is 2A√d₁ (d = u_f − u),
 * of which the rows already hold each root's last segment as a trapezoid, ½(P_prev + P_end)(d₁ − d₀): the bridge carries
 * the rest, 2A√d₁ − ½(P_prev + P_end)(d₁ − d₀) a root (the trapezoid alone overstates a 1/√ end by ~12 % at d₀ = d₁/4).
 */
function bridge(sweep: PlaneSweep, branch: PlaneSweep, end: number, previous: number): PlaneSweep {
  const pEnd = powerAt(sweep, end);
  const pPrevious = powerAt(sweep, previous);
  const step = Math.abs(sweep.u[end] - sweep.u[previous]);
  // P²·d is the same at both samples: d₀ = P_prev²·step / (P_end² − P_prev²); the fold lies before the next sample,
  // which has no ray, so d₀ is at most a step (a run whose power barely climbs would otherwise put it far away).
  const d0 = Math.min((pPrevious * pPrevious * step) / (pEnd * pEnd - pPrevious * pPrevious), step);
  const d1 = d0 + step;
  let carried = 0;
  for (const root of [sweep, branch]) {
    const a = powerAt(root, end) * Math.sqrt(d0);
    const last = root.ok[previous] ? 0.5 * (powerAt(root, previous) + powerAt(root, end)) * step : 0;
    carried += 2 * a * Math.sqrt(d1) - last;
  }
  const ends = powerAt(sweep, end) + powerAt(branch, end);
  const across = emptySweep(sweep.order, Float64Array.of(0, Math.max(0, (2 * carried) / ends)));
  for (const [k, from] of [[0, sweep], [1, branch]] as const) {
    across.ok[k] = 1;
    across.thetaSigned[k] = from.thetaSigned[end];
    across.perpPerU[k] = from.perpPerU[end];
    across.parPerU[k] = from.parPerU[end];
  }
  return across;
}

/** The branch through (u[from], vStart), followed in direction `step` (lib/rays/follow-root.ts); null if no ray is found at all. */
function followBranch(tracer: PlaneTracer, known: readonly PlaneSweep[], p: number, from: number, step: 1 | -1, vStart: number, near?: NearAngles): PlaneSweep | null {
  return followRoot(tracer, known, p, known[0].u, from, step, near, { into: null, sign: 0, predictor: new RayPredictor(), guess: vStart });
}
