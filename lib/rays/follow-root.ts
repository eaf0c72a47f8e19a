// One root v*(u) of Y(u, v) = 0 followed from sample to sample, as the branches of a sweep are (lib/rays/fold-back.ts,
// lost-roots.ts, root-census.ts): each search starts from the rays before it, and the root ends where a search finds
// no ray, finds one whose light lands away from the grid, one of the other sign of ∂Y/∂v (a root keeps its sign along
// u: PlaneSweep.yvSign), one too far from its prediction, or one a known sweep already has.

import { emptySweep, isNear, storeRay, type NearAngles, type PlaneSweep, type PlaneTracer, type RayPredictor } from "./plane-sweep.js";

/** Roots nearer than this (units of a) are one root. */
export const SAME_ROOT = 1e-7;

/** Whether some known sweep has its ray at sample s at offset v. */
export function onKnown(known: readonly PlaneSweep[], s: number, v: number): boolean {
  return known.some((sweep) => sweep.ok[s] === 1 && Math.abs(sweep.v[s] - v) <= SAME_ROOT);
}

export interface RootStart {
  /** The sweep the rays go into; null: one made at the first ray (the result is null if none is found). */
  into: PlaneSweep | null;
  /** The root's sign of ∂Y/∂v; 0: the first ray's. */
  sign: number;
  /** Starts of the searches: the predictor (rays indexed by samples from the first followed, which is k = 0), else `guess`. */
  predictor: RayPredictor;
  guess: number;
  /**
   * A ray further than max(steps × the last step in v, min) from its prediction ends the root (another root of the same
   * sign found); lastStep: the step in v before the first sample followed.
   */
  reach?: { steps: number; min: number; lastStep: number };
}

/** Follows a root of order p over the pupil samples u from sample `from` in direction `step` (see above); returns the sweep holding its rays. */
export function followRoot(
  tracer: PlaneTracer,
  known: readonly PlaneSweep[],
  p: number,
  u: Float64Array,
  from: number,
  step: 1 | -1,
  near: NearAngles | undefined,
  start: RootStart,
): PlaneSweep | null {
  const { predictor, reach } = start;
  let { into, sign } = start;
  let previous = start.guess;
  let lastStep = reach?.lastStep ?? 0;
  for (let s = from, k = 0; s >= 0 && s < u.length; s += step, k++) {
    const guess = predictor.guess(k, previous);
    const ray = tracer.planeRay(u[s], guess, p);
    if (ray === null || !isNear(near, ray.thetaSigned) || (sign !== 0 && Math.sign(ray.yv) !== sign)) break;
    if (reach && Math.abs(ray.v - guess) > Math.max(reach.steps * lastStep, reach.min)) break;
    if (onKnown(known, s, ray.v)) break;
    sign = Math.sign(ray.yv);
    predictor.add(k, ray.v);
    lastStep = Math.abs(ray.v - previous);
    previous = ray.v;
    into ??= emptySweep(p, u);
    storeRay(into, s, ray);
  }
  return into;
}
