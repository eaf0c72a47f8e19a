// A plane sweep (lib/rays/plane-sweep.ts sweepPlane) that traces every `step`-th pupil sample and fills the samples
// between by cubic interpolation in the sample index s, where that can be trusted. On each side of the axis the
// samples are u_s = U·sin(π s/2S): every quantity a sample carries (Θ, v, amplitudes, optical path, exit offset) is
// a smooth function of s within a run of rays that leave in the plane (the sine takes the square-root turn of Θ(u) at
// the rim), so the cubic through the four nearest traced samples (Lagrange's form, Press et al. 2007, Numerical
// Recipes §3.2, Eq. 3.2.1) is accurate to ~ step⁴. A cell between two traced samples is filled only when the cubic's
// nodes and a fifth traced sample all have their ray and the error estimate of every quantity is within the
// tolerances of interpolation across the index (lib/rays/sweep-interpolation.ts). The estimate is the next term of
// Newton's form, |f[s₀…s₄]·Π(s − s_k)| (ibid. §3.2), the larger of the fifth node's two choices: it follows the cubic's
// error where the quantity is smooth and grows without bound across a kink or jump (the order's end at the rim or
// by total reflection, an amplitude's sign change). A cell that fails is halved (its middle sample traced) while
// it spans at least MIN_SPLIT samples, then traced in full, as sweepPlane does: cells with an end without a ray
// included (a search that finds no ray stops at its first trace), so no ray sweepPlane finds is left out.

import { emptySweep, RayPredictor, storeRay, unwrap, type PlaneSweep, type PlaneTracer, type SweepWindow } from "./plane-sweep.js";
import { AMPLITUDE_TOLERANCE, PATH_TOLERANCE, THETA_TOLERANCE_RAD } from "./sweep-interpolation.js";

/** Rays traced and samples filled by coarse sweeps (benchmarks and tests count them). */
export interface CoarseSweepCount {
  traced: number;
  filled: number;
}

/** Quantities a sample carries that are filled; each is checked against its tolerance except v (a starting guess). */
const FIELDS = ["thetaSigned", "path", "offset", "perpAmp", "parAmp", "v"] as const;
type Field = (typeof FIELDS)[number];
const CHECKED: readonly Field[] = ["thetaSigned", "path", "offset", "perpAmp", "parAmp"];

/** A failing cell narrower than this is traced in full rather than halved again. */
const MIN_SPLIT = 4;

/** Newton's divided difference f[x₀…x_{m−1}] (Press et al. 2007 §3.2), overwriting f. */
function dividedDifference(x: readonly number[], f: number[]): number {
  for (let level = 1; level < x.length; level++) {
    for (let k = x.length - 1; k >= level; k--) f[k] = (f[k] - f[k - 1]) / (x[k] - x[k - level]);
  }
  return f[x.length - 1];
}

/**
 * The sweep of order p over 2·halfSegments + 1 pupil samples as sweepPlane makes it, tracing every step-th sample
 * (and the ends of each run the window wants) and, where interpolation is not trusted, more.
 */
export function sweepPlaneCoarse(
  tracer: PlaneTracer,
  p: number,
  halfSegments: number,
  step: number,
  window?: SweepWindow,
  count: CoarseSweepCount = { traced: 0, filled: 0 },
): PlaneSweep {
  const S = halfSegments;
  const sweep = emptySweep(p, new Float64Array(2 * S + 1));
  const wanted = new Uint8Array(S + 1);
  // Per side: which samples were traced (the nodes of the cubics) and their ∂Y/∂v (a search's first chord).
  const traced = new Uint8Array(S + 1);
  const slopes = new Float64Array(S + 1);
  const scratch = [0, 0, 0, 0, 0];
  const weights = [0, 0, 0, 0];
  for (const sign of [1, -1] as const) {
    const half = tracer.pupilHalfWidth(sign);
    const at = (s: number) => S + sign * s;
    for (let s = 0; s <= S; s++) {
      const u = sign * half * Math.sin((Math.PI * s) / (2 * S));
      if (s > 0 || sign === 1) sweep.u[at(s)] = u;
      wanted[s] = !window || window.wants(u) ? 1 : 0;
    }
    traced.fill(0);
    // The central sample belongs to the + side; the − side's runs start from it (as sweepPlane's − side does).
    const first = sign === 1 ? 0 : 1;
    if (sign === -1) traced[0] = 1;

    const trace = (s: number, guess: number, predictor: RayPredictor): void => {
      count.traced++;
      traced[s] = 1;
      const ray = tracer.planeRay(sweep.u[at(s)], predictor.guess(s, guess), p, false, predictor.slope);
      if (ray === null) return;
      predictor.add(s, ray.v, ray.yv);
      slopes[s] = ray.yv;
      storeRay(sweep, at(s), ray);
    };
    /** A search's start at s from the traced samples before it (towards the run's start), c0 the nearest. */
    const predictorFrom = (c0: number, lo: number): RayPredictor => {
      const predictor = new RayPredictor(Infinity);
      const before: number[] = [];
      for (let j = c0; j >= lo && before.length < 3; j--) if (traced[j] && sweep.ok[at(j)]) before.unshift(j);
      for (const j of before) predictor.add(j, sweep.v[at(j)], slopes[j]);
      return predictor;
    };

    for (let a = first; a <= S; a++) {
      if (!wanted[a]) continue;
      let b = a;
      while (b + 1 <= S && wanted[b + 1]) b++;
      const lo = sign === -1 && a === 1 && wanted[0] ? 0 : a;
      // Where the search starts: v = 0 at the side's first sample (as sweepPlane), else the window's guess after a gap.
      const startGuess = a === first ? 0 : window!.guess(sweep.u[at(a)]);
      const coarse = new RayPredictor(2 * step);
      if (lo === 0 && sign === -1 && sweep.ok[S]) coarse.add(0, sweep.v[S], slopes[0]);
      const cells: [number, number][] = [];
      let previous = -1;
      for (let s = lo; s <= b; s++) {
        if (!(s === lo || s === b || s % step === 0)) continue;
        if (!traced[s]) trace(s, startGuess, coarse);
        if (previous >= 0 && s - previous > 1) cells.push([previous, s]);
        previous = s;
      }
      while (cells.length > 0) {
        const [c0, c1] = cells.pop()!;
        if (fill(c0, c1, lo, b)) {
          count.filled += c1 - c0 - 1;
          continue;
        }
        const fallback = sweep.ok[at(c0)] ? sweep.v[at(c0)] : startGuess;
        if (c1 - c0 >= MIN_SPLIT) {
          const mid = (c0 + c1) >> 1;
          trace(mid, fallback, predictorFrom(c0, lo));
          cells.push([mid, c1], [c0, mid]);
          continue;
        }
        const predictor = predictorFrom(c0, lo);
        for (let s = c0 + 1; s < c1; s++) trace(s, fallback, predictor);
      }
      a = b;
    }

    /**
     * The cubic's nodes for the cell (c0, c1) among the traced samples of the run lo … hi: the cell's ends and the
     * nearest traced sample on each side where there is one (else two on the other side), then the fifth nodes.
     */
    function stencil(c0: number, c1: number, lo: number, hi: number): { nodes: number[]; fifth: number[] } | null {
      const left: number[] = [];
      for (let j = c0 - 1; j >= lo && left.length < 3; j--) if (traced[j]) left.push(j);
      const right: number[] = [];
      for (let j = c1 + 1; j <= hi && right.length < 3; j++) if (traced[j]) right.push(j);
      if (left.length + right.length < 3) return null;
      let nodes: number[];
      if (left.length >= 1 && right.length >= 1) nodes = [left[0], c0, c1, right[0]];
      else if (left.length === 0) nodes = [c0, c1, right[0], right[1]];
      else nodes = [left[1], left[0], c0, c1];
      const fifth = [...left, ...right].filter((j) => !nodes.includes(j)).sort((x, y) => Math.abs(x - c0) - Math.abs(y - c0));
      // The nearest beyond the cubic's nodes on each side.
      const beyondLeft = fifth.find((j) => j < nodes[0]);
      const beyondRight = fifth.find((j) => j > nodes[3]);
      const extra = [beyondLeft, beyondRight].filter((j): j is number => j !== undefined);
      return extra.length > 0 ? { nodes, fifth: extra } : null;
    }

    /** Fills the samples strictly between c0 and c1 from the cubic if trusted; false (nothing written) if not. */
    function fill(c0: number, c1: number, lo: number, hi: number): boolean {
      const around = stencil(c0, c1, lo, hi);
      if (around === null) return false;
      const { nodes, fifth } = around;
      for (const j of [...nodes, ...fifth]) if (!sweep.ok[at(j)]) return false;
      const theta0 = sweep.thetaSigned[at(c0)];
      const value = (field: Field, j: number): number => {
        const x = sweep[field][at(j)];
        return field === "thetaSigned" ? theta0 + unwrap(x - theta0) : x;
      };
      let amplitude = 0;
      for (const j of [...nodes, ...fifth]) amplitude = Math.max(amplitude, Math.abs(sweep.perpAmp[at(j)]), Math.abs(sweep.parAmp[at(j)]));
      const tolerance = (field: Field): number =>
        field === "thetaSigned" ? THETA_TOLERANCE_RAD : field === "path" || field === "offset" ? PATH_TOLERANCE : AMPLITUDE_TOLERANCE * amplitude;
      for (const field of CHECKED) {
        let top = 0;
        for (const extra of fifth) {
          for (let m = 0; m < 4; m++) scratch[m] = value(field, nodes[m]);
          scratch[4] = value(field, extra);
          top = Math.max(top, Math.abs(dividedDifference([...nodes, extra], scratch)));
        }
        for (let s = c0 + 1; s < c1; s++) {
          const omega = Math.abs((s - nodes[0]) * (s - nodes[1]) * (s - nodes[2]) * (s - nodes[3]));
          if (top * omega > tolerance(field)) return false;
        }
      }
      for (let s = c0 + 1; s < c1; s++) {
        for (let m = 0; m < 4; m++) {
          let w = 1;
          for (let k = 0; k < 4; k++) if (k !== m) w *= (s - nodes[k]) / (nodes[m] - nodes[k]);
          weights[m] = w;
        }
        const i = at(s);
        sweep.ok[i] = 1;
        for (const field of FIELDS) {
          let sum = 0;
          for (let m = 0; m < 4; m++) sum += weights[m] * value(field, nodes[m]);
          sweep[field][i] = field === "thetaSigned" ? unwrap(sum) : sum;
        }
        sweep.perpPerU[i] = sweep.perpAmp[i] ** 2;
        sweep.parPerU[i] = sweep.parAmp[i] ** 2;
      }
      return true;
    }
  }
  return sweep;
}
