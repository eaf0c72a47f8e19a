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

import { emptySweep, RayPredictor, setPowers, storeRay, unwrap, type PlaneSweep, type PlaneTracer, type SweepWindow } from "./plane-sweep.js";
import { AMPLITUDE_TOLERANCE, PATH_TOLERANCE, THETA_TOLERANCE_RAD } from "./sweep-interpolation.js";

/** Rays traced and samples filled by coarse sweeps (benchmarks and tests count them). */
export interface CoarseSweepCount {
  traced: number;
  filled: number;
}

/** Quantities a sample carries that are filled; each is checked against its tolerance except v (a starting guess). */
const FIELDS = ["thetaSigned", "path", "offset", "perpAmp", "parAmp", "perpCross", "parCross", "v"] as const;
/** FIELDS before CHECKED_COUNT are checked; their indices in FIELDS: */
const CHECKED_COUNT = 7;
const THETA = FIELDS.indexOf("thetaSigned");
const PATH = FIELDS.indexOf("path");
const OFFSET = FIELDS.indexOf("offset");

/** A failing cell narrower than this is traced in full rather than halved again. */
const MIN_SPLIT = 4;

/**
 * The weights c_m of Newton's divided difference f[x₀…x₄] = Σ c_m f(x_m), c_m = 1 / Π_{k≠m}(x_m − x_k) (the
 * symmetric form of Newton's divided difference, common practice), into c: one set serves every field of a cell.
 */
function dividedDifferenceWeights(x: Float64Array, c: Float64Array): void {
  for (let m = 0; m < 5; m++) {
    let product = 1;
    for (let k = 0; k < 5; k++) if (k !== m) product *= x[m] - x[k];
    c[m] = 1 / product;
  }
}

/** The pupil's sample positions sin(π s / 2S), s = 0…S, by S: the same for every plane, order and side. */
const sineTables = new Map<number, Float64Array>();
function pupilSines(S: number): Float64Array {
  let table = sineTables.get(S);
  if (!table) {
    table = Float64Array.from({ length: S + 1 }, (_, s) => Math.sin((Math.PI * s) / (2 * S)));
    sineTables.set(S, table);
  }
  return table;
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
  // Per side: which samples were traced (the nodes of the cubics).
  const traced = new Uint8Array(S + 1);
  const fields = FIELDS.map((f) => sweep[f]);
  // Scratch of fill and stencil: the cubic's nodes, the fifth nodes, the nearest traced samples each side of a cell.
  const nodes = new Float64Array(4);
  const fifth = new Float64Array(2);
  const left = new Float64Array(3);
  const right = new Float64Array(3);
  const x5 = new Float64Array(5);
  // Divided-difference weights for each choice of fifth node (dividedDifferenceWeights), and the cubic's Lagrange
  // denominators' inverses 1 / Π_{k≠m}(s_m − s_k).
  const ddWeights = [new Float64Array(5), new Float64Array(5)];
  const inverseDenominators = new Float64Array(4);
  const weights = new Float64Array(4);
  const nodeValues = new Float64Array(6 * FIELDS.length);
  // The starts of searches inside a cell (predictorFrom): from rays on both sides, or before it only.
  const interpolating = new RayPredictor(Infinity, 4);
  const extrapolating = new RayPredictor(Infinity);
  const before = new Float64Array(3);
  const after = new Float64Array(2);
  const sines = pupilSines(S);
  for (const sign of [1, -1] as const) {
    const half = tracer.pupilHalfWidth(sign);
    const at = (s: number) => S + sign * s;
    for (let s = 0; s <= S; s++) {
      const u = sign * half * sines[s];
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
      const ray = tracer.planeRay(sweep.u[at(s)], predictor.guess(s, guess), p);
      if (ray === null) return;
      predictor.add(s, ray.v);
      storeRay(sweep, at(s), ray);
    };
    /**
     * A search's start inside the cell (c0, c1) of the run lo … hi: the cubic through the two traced rays nearest each
     * side where the cell's far end has one (interpolation, Press et al. 2007 §3.2: an error ~ step⁴ instead of the
     * extrapolation's ~ step³), else extrapolated from the three traced rays nearest before it, c0 the nearest.
     */
    const predictorFrom = (c0: number, c1: number, lo: number, hi: number): RayPredictor => {
      const traces = (j: number) => traced[j] === 1 && sweep.ok[at(j)] === 1;
      let afterCount = 0;
      for (let j = c1; j <= hi && afterCount < 2; j++) if (traces(j)) after[afterCount++] = j;
      const both = afterCount > 0 && after[0] === c1;
      const predictor = both ? interpolating : extrapolating;
      predictor.reset();
      let beforeCount = 0;
      for (let j = c0; j >= lo && beforeCount < (both ? 2 : 3); j--) if (traces(j)) before[beforeCount++] = j;
      for (let k = beforeCount - 1; k >= 0; k--) predictor.add(before[k], sweep.v[at(before[k])]);
      if (both) for (let k = 0; k < afterCount; k++) predictor.add(after[k], sweep.v[at(after[k])]);
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
      if (lo === 0 && sign === -1 && sweep.ok[S]) coarse.add(0, sweep.v[S]);
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
          trace(mid, fallback, predictorFrom(c0, c1, lo, b));
          cells.push([mid, c1], [c0, mid]);
          continue;
        }
        const predictor = predictorFrom(c0, c1, lo, b);
        for (let s = c0 + 1; s < c1; s++) trace(s, fallback, predictor);
      }
      a = b;
    }

    /**
     * The cubic's nodes for the cell (c0, c1) among the traced samples of the run lo … hi, into nodes[0…3]: the cell's
     * ends and the nearest traced sample on each side where there is one (else two on the other side); then the fifth
     * nodes, the nearest traced sample beyond the cubic's on each side where there is one, into fifth (their count
     * returned; 0: no stencil).
     */
    function stencil(c0: number, c1: number, lo: number, hi: number): number {
      let leftCount = 0;
      for (let j = c0 - 1; j >= lo && leftCount < 3; j--) if (traced[j]) left[leftCount++] = j;
      let rightCount = 0;
      for (let j = c1 + 1; j <= hi && rightCount < 3; j++) if (traced[j]) right[rightCount++] = j;
      if (leftCount + rightCount < 3) return 0;
      let fifthCount = 0;
      if (leftCount >= 1 && rightCount >= 1) {
        nodes[0] = left[0];
        nodes[1] = c0;
        nodes[2] = c1;
        nodes[3] = right[0];
        if (leftCount >= 2) fifth[fifthCount++] = left[1];
        if (rightCount >= 2) fifth[fifthCount++] = right[1];
      } else if (leftCount === 0) {
        nodes[0] = c0;
        nodes[1] = c1;
        nodes[2] = right[0];
        nodes[3] = right[1];
        fifth[fifthCount++] = right[2];
      } else {
        nodes[0] = left[1];
        nodes[1] = left[0];
        nodes[2] = c0;
        nodes[3] = c1;
        fifth[fifthCount++] = left[2];
      }
      return fifthCount;
    }

    /** Fills the samples strictly between c0 and c1 from the cubic if trusted; false (nothing written) if not. */
    function fill(c0: number, c1: number, lo: number, hi: number): boolean {
      const fifthCount = stencil(c0, c1, lo, hi);
      if (fifthCount === 0) return false;
      let amplitude = 0;
      for (let m = 0; m < 4 + fifthCount; m++) {
        const i = at(m < 4 ? nodes[m] : fifth[m - 4]);
        if (!sweep.ok[i]) return false;
        amplitude = Math.max(amplitude, Math.abs(sweep.perpAmp[i]), Math.abs(sweep.parAmp[i]), Math.abs(sweep.perpCross[i]), Math.abs(sweep.parCross[i]));
      }
      // Each field at the nodes then the fifth nodes (nodeValues[6f + m]), Θ unwrapped about the cell's first end so
      // that a cubic never spans the jump at ±π.
      const theta0 = sweep.thetaSigned[at(c0)];
      for (let m = 0; m < 4 + fifthCount; m++) {
        const i = at(m < 4 ? nodes[m] : fifth[m - 4]);
        for (let f = 0; f < FIELDS.length; f++) {
          const x = fields[f][i];
          nodeValues[6 * f + m] = f === THETA ? theta0 + unwrap(x - theta0) : x;
        }
      }
      // The error bound's largest Π|s − s_k| over the cell's samples (a check that fails at one sample fails at this one).
      let omega = 0;
      for (let s = c0 + 1; s < c1; s++) omega = Math.max(omega, Math.abs((s - nodes[0]) * (s - nodes[1]) * (s - nodes[2]) * (s - nodes[3])));
      for (let e = 0; e < fifthCount; e++) {
        for (let m = 0; m < 4; m++) x5[m] = nodes[m];
        x5[4] = fifth[e];
        dividedDifferenceWeights(x5, ddWeights[e]);
      }
      for (let f = 0; f < CHECKED_COUNT; f++) {
        let top = 0;
        for (let e = 0; e < fifthCount; e++) {
          const c = ddWeights[e];
          const base = 6 * f;
          const difference =
            c[0] * nodeValues[base] + c[1] * nodeValues[base + 1] + c[2] * nodeValues[base + 2] + c[3] * nodeValues[base + 3] + c[4] * nodeValues[base + 4 + e];
          top = Math.max(top, Math.abs(difference));
        }
        const tolerance = f === THETA ? THETA_TOLERANCE_RAD : f === PATH || f === OFFSET ? PATH_TOLERANCE : AMPLITUDE_TOLERANCE * amplitude;
        if (top * omega > tolerance) return false;
      }
      for (let m = 0; m < 4; m++) {
        let product = 1;
        for (let k = 0; k < 4; k++) if (k !== m) product *= nodes[m] - nodes[k];
        inverseDenominators[m] = 1 / product;
      }
      for (let s = c0 + 1; s < c1; s++) {
        const d0 = s - nodes[0];
        const d1 = s - nodes[1];
        const d2 = s - nodes[2];
        const d3 = s - nodes[3];
        weights[0] = d1 * d2 * d3 * inverseDenominators[0];
        weights[1] = d0 * d2 * d3 * inverseDenominators[1];
        weights[2] = d0 * d1 * d3 * inverseDenominators[2];
        weights[3] = d0 * d1 * d2 * inverseDenominators[3];
        const i = at(s);
        sweep.ok[i] = 1;
        // A trusted cell lies within one run of one root: its ends' sign of ∂Y/∂v (0 where they differ).
        sweep.yvSign[i] = sweep.yvSign[at(c0)] === sweep.yvSign[at(c1)] ? sweep.yvSign[at(c0)] : 0;
        for (let f = 0; f < FIELDS.length; f++) {
          let sum = 0;
          for (let m = 0; m < 4; m++) sum += weights[m] * nodeValues[6 * f + m];
          fields[f][i] = f === THETA ? unwrap(sum) : sum;
        }
        setPowers(sweep, i);
      }
      return true;
    }
  }
  return sweep;
}
