// Roots of Y(u, v) = 0 that no sweep reaches. A sweep and its branches (lib/rays/plane-sweep.ts, fold-back.ts,
// lost-roots.ts) follow the zero curve from the pupil's centre and from where runs end; a piece of the curve that never
// meets them is missed: a closed loop, or a root beyond a second fold facing the first across a narrow gap in u (the
// unfolding of two roots crossing). Measured by brute force over the whole pupil (bench/sky-brute.ts): upright 2 mm
// equilibrium drops, sun 10°, arc 92.5°: the primary's order at Θ 136.5–138.5° from u ≈ −0.8…−1.0, v ≈ 0…0.25, absent
// from every sweep (its bins 0.0–1.5 against 4.0–6.3); 2.5 mm drops, sun 5°, near the top of the bow: the secondary's
// order at Θ 138.5–141.5° from a loop at u ≈ 0.42–0.62, v ≈ 0.35–0.8 (a bin 0.15 against 0.99 of the brightest). Here a
// census scans Y along v at a few pupil abscissae for sign changes no known sweep accounts for, and follows each root
// found both ways as a sweep of its own.

import { followRoot, onKnown } from "./follow-root.js";
import { emptySweep, isNear, RayPredictor, storeRay, type NearAngles, type PlaneSweep, type PlaneTracer } from "./plane-sweep.js";

/**
 * Pupil abscissae scanned, evenly in the sweep's sample index (so densest near the rims: plane-sweep.ts's sine spacing),
 * and traces along each chord (a root is seen where its neighbour lies more than 2·chord/CENSUS_ORDINATES away).
 * Measured against brute force on the sky (bench/sky-brute.ts, 8 planes a 5° bin): 24 × 40 and 16 × 32 found the same
 * roots (2 mm drops at the side, sun 10°: worst bin 0.038 of the brightest; 2.5 mm near the top, sun 5°, the
 * secondary's loop: 0.109), 12 × 24 lost most of the loop (0.44).
 */
const CENSUS_ABSCISSAE = 16;
const CENSUS_ORDINATES = 32;

/** Follows a root from the sweep `root`'s ray at sample `from` in direction `step` into the same sweep (lib/rays/follow-root.ts). */
function follow(tracer: PlaneTracer, known: readonly PlaneSweep[], root: PlaneSweep, from: number, step: 1 | -1, near?: NearAngles): void {
  const predictor = new RayPredictor();
  predictor.add(-1, root.v[from]);
  followRoot(tracer, known, root.order, root.u, from + step, step, near, { into: root, sign: root.yvSign[from], predictor, guess: root.v[from] });
}

/** Whether a known sweep has a root at sample s with v between a and b. */
function knownBetween(known: readonly PlaneSweep[], s: number, a: number, b: number): boolean {
  const lo = Math.min(a, b);
  const hi = Math.max(a, b);
  return known.some((sweep) => sweep.ok[s] === 1 && sweep.v[s] >= lo && sweep.v[s] <= hi);
}

/**
 * The roots a census finds apart from the known sweeps (the first of them: the sweep whose pupil samples they share),
 * whose light lands near the grid (near), each followed both ways from where it was found; each is added to `known`.
 * The whole pupil is scanned, not only the sweep's window: the window is where the sweep's own run sends light near
 * the grid, and a root no run reaches is outside it as often as not (2 mm drops above).
 */
export function censusRoots(tracer: PlaneTracer, known: PlaneSweep[], near?: NearAngles): PlaneSweep[] {
  const base = known[0];
  const p = base.order;
  const count = base.u.length;
  const reach = tracer.setup.outline.maxRadius;
  const found: PlaneSweep[] = [];
  for (let k = 1; k <= CENSUS_ABSCISSAE; k++) {
    const s = Math.round((k * (count - 1)) / (CENSUS_ABSCISSAE + 1));
    const u = base.u[s];
    const chord = Math.sqrt(Math.max(0, reach * reach - u * u));
    let previousV = Number.NaN;
    let previousY = Number.NaN;
    for (let j = 0; j <= CENSUS_ORDINATES; j++) {
      const v = -chord + (2 * chord * j) / CENSUS_ORDINATES;
      if (!tracer.traceAt(u, v, p)) {
        previousV = Number.NaN;
        continue;
      }
      const { y } = tracer.lastExit(p);
      const seen = !Number.isNaN(previousV) && Math.sign(y) !== Math.sign(previousY) && !knownBetween(known, s, previousV, v);
      const from = previousV;
      previousV = v;
      previousY = y;
      if (!seen) continue;
      const ray = tracer.planeRay(u, 0.5 * (v + from), p);
      if (ray === null || !isNear(near, ray.thetaSigned) || onKnown(known, s, ray.v)) continue;
      const root = emptySweep(p, base.u);
      storeRay(root, s, ray);
      follow(tracer, known, root, s, 1, near);
      follow(tracer, known, root, s, -1, near);
      known.push(root);
      found.push(root);
    }
  }
  return found;
}
