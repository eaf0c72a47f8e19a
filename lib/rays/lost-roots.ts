// Roots of Y(u, v) = 0 that a sweep loses at its runs' ends. A sweep (lib/rays/plane-sweep.ts) follows one root v*(u)
// outwards from the pupil's centre, each search started from the rays before it. Two ways lose a root that goes on:
// - a gap: the search at one sample fails (the root it follows ends there, at a fold), the sweep picks up another root
//   further out, and that root is never followed back inwards across the gap (1.5 mm equilibrium drops, sun 10°, arc
//   92.5°: the rim's root, v ≈ −0.135 at u ≈ −1.0437, goes on inwards to v ≈ −0.6 as bright as the primary's inner
//   side at Θ 153–155°, and was missing);
// - a hop: the search converges on a root of a pair born close by and the run goes on along it with no gap. A root
//   keeps the sign of ∂Y/∂v along u (PlaneSweep.yvSign), so a hop shows as neighbouring rays of opposite signs.
// Here each hop splits its run (the shorter side moves to a sweep of its own), and every root at a hop or a gap is
// followed on from its last rays as far as it goes (while its light lands near the grid), as a sweep of its own.
// Folds, where a root does end and its partner turns back, are lib/rays/fold-back.ts's.

import { foldBackBranches } from "./fold-back.js";
import { followRoot } from "./follow-root.js";
import { censusRoots } from "./root-census.js";
import { outlineAxisRatio, type DropOutline } from "../drops/shape/outline.js";
import { copyRay, emptySweep, RayPredictor, type NearAngles, type PlaneSweep, type PlaneTracer } from "./plane-sweep.js";

/** Rays of a piece a continuation's first guess is extrapolated from (plane-sweep.ts PREDICTOR_RAYS). */
const SEED_RAYS = 3;
/**
 * A continuation's ray may lie this many times the piece's last step in v from the predicted v (and at least
 * MIN_REACH, units of a): further, the search has converged on another root of the same sign.
 */
const REACH_STEPS = 8;
const MIN_REACH = 1e-3;

/** One run's stretch between hops or gaps: samples first…last. */
interface Piece {
  first: number;
  last: number;
}

/** Whether neighbouring rays at s and s + 1 of sweep lie on two roots (both known signs of ∂Y/∂v, different). */
function hopsAfter(sweep: PlaneSweep, s: number): boolean {
  const a = sweep.yvSign[s];
  const b = sweep.yvSign[s + 1];
  return sweep.ok[s] === 1 && sweep.ok[s + 1] === 1 && a !== 0 && b !== 0 && a !== b;
}

/** The sweep's runs cut at hops: each run's pieces in order, and the samples s whose ray hops to s + 1's. */
function runPieces(sweep: PlaneSweep): { runs: Piece[][]; hops: Set<number> } {
  const runs: Piece[][] = [];
  const hops = new Set<number>();
  let run: Piece[] = [];
  let first = -1;
  for (let s = 0; s < sweep.u.length; s++) {
    if (!sweep.ok[s]) continue;
    if (first < 0) first = s;
    const hop = s + 1 < sweep.u.length && hopsAfter(sweep, s);
    const ends = s + 1 >= sweep.u.length || !sweep.ok[s + 1];
    if (hop || ends) {
      run.push({ first, last: s });
      first = -1;
    }
    if (hop) hops.add(s);
    if (ends) {
      runs.push(run);
      run = [];
    }
  }
  return { runs, hops };
}

/**
 * A piece's root followed on beyond its end sample `end` in direction step, each search started from the last rays
 * (the piece's, then its own), while it finds a ray near the grid (near), of the root's sign of ∂Y/∂v, within reach of
 * the prediction and on no known sweep's root. Rays go into a sweep of their own, made at the first (null: none). The
 * segment from `end` to the first of them is not binned, as it may straddle the point where the search lost the root,
 * which can be a singular one (two roots crossing at a saddle of Y, where each carries power ∝ 1/|u − u_c|: 2 mm
 * equilibrium drops, sun on the horizon, arc 90°, where the widest section's root v ≡ v_c meets the roots the drop's
 * vertical curvature focuses back into the plane).
 */
function continueRoot(tracer: PlaneTracer, known: readonly PlaneSweep[], from: PlaneSweep, end: number, step: 1 | -1, near?: NearAngles): PlaneSweep | null {
  const predictor = new RayPredictor();
  const seeds: number[] = [];
  for (let s = end; seeds.length < SEED_RAYS && s >= 0 && s < from.u.length && from.ok[s]; s -= step) seeds.push(s);
  // Indexed by sample distance from the first sample followed (end + step): the seeds lie at −1, −2, …
  for (let k = seeds.length - 1; k >= 0; k--) predictor.add(-(k + 1), from.v[seeds[k]]);
  const lastStep = seeds.length > 1 ? Math.abs(from.v[seeds[0]] - from.v[seeds[1]]) : 0;
  return followRoot(tracer, known, from.order, from.u, end + step, step, near, {
    into: null,
    sign: from.yvSign[end],
    predictor,
    guess: from.v[end],
    reach: { steps: REACH_STEPS, min: MIN_REACH, lastStep },
  });
}

/**
 * Splits sweep's runs at its hops: in each run with hops the longest piece stays (the bow's fold, which the uniform
 * table is made from, lies inside a run, not in its rim-side scraps) and every other piece moves to a sweep of its
 * own, added to `known`; returns those sweeps and every piece with the sweep that now holds it and its hops.
 */
function splitHops(sweep: PlaneSweep, known: PlaneSweep[]): { moved: PlaneSweep[]; pieces: { piece: Piece; holder: PlaneSweep }[]; hops: Set<number> } {
  const { runs, hops } = runPieces(sweep);
  const moved: PlaneSweep[] = [];
  const pieces: { piece: Piece; holder: PlaneSweep }[] = [];
  for (const run of runs) {
    const longest = run.reduce((best, piece) => (piece.last - piece.first > best.last - best.first ? piece : best));
    for (const piece of run) {
      if (piece === longest) {
        pieces.push({ piece, holder: sweep });
        continue;
      }
      const holder = emptySweep(sweep.order, sweep.u);
      for (let s = piece.first; s <= piece.last; s++) {
        copyRay(sweep, holder, s);
        sweep.ok[s] = 0;
      }
      known.push(holder);
      moved.push(holder);
      pieces.push({ piece, holder });
    }
  }
  return { moved, pieces, hops };
}

/**
 * Every other root a sweep's runs lead to: the pieces split off at its hops, the roots followed on across its hops and
 * gaps (each a sweep of its own), the branches beyond every run's folds (lib/rays/fold-back.ts), and for the bows'
 * orders the roots a census finds apart from all of those, with their own folds' branches. The sweep keeps its longest
 * pieces; the rest are ray optics in the rows (lib/bow/shaped-plane-rows.ts contextFromSweeps).
 */
export function sweepBranches(tracer: PlaneTracer, sweep: PlaneSweep, near?: NearAngles): PlaneSweep[] {
  const known = [sweep];
  const { moved, pieces, hops } = splitHops(sweep, known);
  const followed: PlaneSweep[] = [];
  for (const { piece, holder } of pieces) {
    for (const [end, step] of [[piece.first, -1], [piece.last, 1]] as const) {
      const next = end + step;
      if (next < 0 || next >= sweep.u.length) continue;
      const hop = hops.has(Math.min(end, next));
      // A gap: the next sample has no ray in the sweep (a hop's next sample now lies in another piece's sweep).
      if (!hop && sweep.ok[next]) continue;
      const into = continueRoot(tracer, known, holder, end, step, near);
      if (into !== null) {
        known.push(into);
        followed.push(into);
      }
    }
  }
  const roots = [sweep, ...moved, ...followed];
  const beyond = roots.flatMap((root) => foldBackBranches(tracer, root, near, 1, known));
  // Orders with internal reflections (the bows') have zero curves that no run reaches (lib/rays/root-census.ts).
  const census = sweep.order >= CENSUS_FROM_ORDER && axisRatioOf(tracer.setup.outline) < CENSUS_BELOW_AXIS_RATIO ? censusRoots(tracer, known, near) : [];
  const beyondCensus = census.flatMap((root) => foldBackBranches(tracer, root, near, 1, known));
  return [...moved, ...followed, ...beyond, ...census, ...beyondCensus];
}

/**
 * The lowest order whose zero curves are searched for by census: the primary's (two chords). Without one the
 * reflection was within 0.002 of the brightest bin in every case against brute force on the sky (bench/sky-check.ts);
 * the straight-through order, which lights no bow, was not checked.
 */
const CENSUS_FROM_ORDER = 2;
/**
 * Outlines this flat or flatter get the census: measured on equilibrium drops (sun 0°, 10°, 30°; arc positions 0–180°
 * every 30°; upright and tilted 8°, −10°: 42 planes a size), it found no root at 0.5, 0.75 and 1 mm (axis ratio
 * 0.926) and one at 1.25 mm (0.887) and at 1.5 mm; 2 and 2.5 mm drops lose most of a bow without it (bench/sky-check.ts).
 */
const CENSUS_BELOW_AXIS_RATIO = 0.92;

/** Each outline's axis ratio, found once (outlineAxisRatio scans it finely). */
const axisRatios = new WeakMap<DropOutline, number>();
function axisRatioOf(outline: DropOutline): number {
  let ratio = axisRatios.get(outline);
  if (ratio === undefined) {
    ratio = outlineAxisRatio(outline);
    axisRatios.set(outline, ratio);
  }
  return ratio;
}
