// The bow of one order in one scattering half-plane of a drop of any shape, in the uniform caustic form of
// lib/bow/airy-bins.ts (Chester, Friedman & Ursell 1957; Berry & Mount 1972 §5). Airy's theory extended to
// non-spherical drops: the wavefront of each scattering plane is taken with its own caustic angle Θ_R and its own
// cubic coefficient, as in Möbius (1910, Ann. Phys. 338, 1493, spheroids; from memory) and Können (1987, J. Opt.
// Soc. Am. A 4, 810, flattened raindrops; from memory). Here nothing is expanded by hand: the two rays of the
// fold come from the rays traced in 3D (lib/rays/plane-sweep.ts), their amplitudes from the traced Jacobian and
// their phase difference from the traced optical paths, so the sphere's table is reproduced in the limit. The
// rays at each bin's angle, the fold and its derivatives are read off the sweep by cubic interpolation
// (lib/rays/sweep-cubic.ts) rather than traced again: the sweep is dense enough that the interpolated ray, traced,
// lands within 1e-9 rad of its angle (test/lib/bow/plane-bow-table.test.ts).
//
// With the fold parametrised by the pupil abscissa u: Θ(u) ≈ Θ_R ± ½Θ″(u − u_R)², the exit ray's offset s(u)
// (Hamilton: dW/dΘ = ±s, Born & Wolf 1999 §3.1 characteristic function, from memory) and the amplitude per unit
// √(pupil width) Ã = A/√|∂Y/∂v|; in the variable s the sphere's formulas hold (b is both pupil and offset there):
//   ξ per radian κ = |s′|^{2/3}(2/|Θ″|)^{1/3},  C = 4π·2^{−1/3}·Ã²·|s′|^{1/3}/|Θ″|^{2/3},
//   D = 4π·2^{1/3}·Ã′²·|s′|^{−1/3}/|Θ″|^{4/3}   (sphere: s′ = 1, Ã² = ε²b/sinΘ, lib/rays/airy-bow.ts).

import type { PlaneSweep } from "../rays/plane-sweep.js";
import type { DropTraceSetup } from "../rays/shape-tracer.js";
import { allocateCubic, applyCubic, cubicWeights, type CubicWeights } from "../rays/sweep-cubic.js";
import { binEdges, type UniformBowTable } from "./airy-bins.js";
import { deviationRad, rainbowImpactParameter, scatteringAngleOfDeviation } from "../rays/descartes.js";

const DEG = Math.PI / 180;
/** Golden-section steps for the rainbow ray: 0.618⁶⁰ of a sample spacing pins u_R far below rounding of Θ. */
const GOLDEN_STEPS = 60;
/** Roots are refined until Θ is within this of the target (radians): a phase error x·s·1e-13 ≪ 1 for x < 1e6. */
const ROOT_TOLERANCE_RAD = 1e-13;
const ROOT_STEPS = 60;

export interface PlaneFold {
  uR: number;
  thetaR: number;
  /** True when the lit side (two rays) is Θ > Θ_R. */
  litAbove: boolean;
  /** Sweep samples of the two monotone pieces beside the fold: [first, last] index, inclusive. */
  inner: [number, number];
  outer: [number, number];
}

/** One ray of a bow's pair at a given angle, read off the sweep. */
export interface FoldRay {
  u: number;
  /** Far-field optical path, units of a. */
  path: number;
  /** a/x = Ã/√|dΘ/du| for ⟂ and ∥ (single-ray |S|²/x² = |A|²/|∂(Θ,Y)/∂(u,v)| = Ã²/|dΘ/du| along the curve v*(u)), co-polar. */
  perp: number;
  par: number;
  /** The same of the cross-polar amplitudes (PlaneSweep perpCross, parCross). */
  perpCross: number;
  parCross: number;
}

/** Θ in the half-plane (radians, positive), NaN where the sample is not in it. */
function sideTheta(sweep: PlaneSweep, side: 1 | -1): Float64Array {
  return sweep.thetaSigned.map((t, s) => (sweep.ok[s] && side * t > 0 ? side * t : Number.NaN));
}

const cubic: CubicWeights = allocateCubic();

/** Interpolation weights at u over the fold's run of samples (both pieces: Θ(u) is smooth through the fold). */
function weightsAt(sweep: PlaneSweep, fold: Pick<PlaneFold, "inner" | "outer">, u: number): CubicWeights {
  return cubicWeights(sweep.u, fold.inner[0], fold.outer[1], u, cubic);
}

/**
 * The fold of the sweep's half-plane whose angle is nearest nearRad (the sphere's bow angle for this order): a
 * flattened or tilted drop can have further folds (near the backward direction, or where the sphere's bow splits),
 * whose light stays ray optics (bin means, finite); null if the order has no fold there.
 */
export function findFold(sweep: PlaneSweep, side: 1 | -1, nearRad: number): PlaneFold | null {
  const t = sideTheta(sweep, side);
  const joined = (s: number) => !Number.isNaN(t[s]) && !Number.isNaN(t[s + 1]) && Math.abs(t[s + 1] - t[s]) < Math.PI / 2;
  let best = -1;
  for (let s = 1; s + 1 < t.length; s++) {
    if (!joined(s - 1) || !joined(s)) continue;
    if ((t[s] - t[s - 1]) * (t[s + 1] - t[s]) < 0 && (best < 0 || Math.abs(t[s] - nearRad) < Math.abs(t[best] - nearRad))) best = s;
  }
  if (best < 0) return null;
  const isMin = t[best] < t[best - 1];
  // The monotone pieces on each side, walking away from the fold until Θ turns again or the run breaks.
  const direction = (s: number) => Math.sign(t[s + 1] - t[s]);
  const leftDir = direction(best - 1);
  let first = best - 1;
  while (first - 1 >= 0 && joined(first - 1) && direction(first - 1) === leftDir) first--;
  const rightDir = direction(best);
  let last = best + 1;
  while (last + 1 < t.length && joined(last) && direction(last) === rightDir) last++;
  // The cubics need four samples.
  if (last - first < 3) return null;
  const run = { inner: [first, first] as [number, number], outer: [last, last] as [number, number] };
  const score = (u: number) => (isMin ? 1 : -1) * side * applyCubic(weightsAt(sweep, run, u).value, cubic.first, sweep.thetaSigned);
  // Golden-section search for the extremum of Θ(u) between the neighbouring samples (Press et al. 2007 §10.2).
  let a = sweep.u[best - 1];
  let b = sweep.u[best + 1];
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = score(c);
  let fd = score(d);
  for (let it = 0; it < GOLDEN_STEPS; it++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = score(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = score(d);
    }
  }
  const uR = 0.5 * (a + b);
  // Sample `best` lies on one side of u_R; each piece keeps its own samples (u ascending with the index).
  const bestIsLeft = sweep.u[best] < uR;
  return {
    uR,
    thetaR: (isMin ? 1 : -1) * score(uR),
    litAbove: isMin,
    inner: [first, bestIsLeft ? best : best - 1],
    outer: [bestIsLeft ? best + 1 : best, last],
  };
}

/** The fold's uniform-form constants (header): ξ per radian κ and the C, D of each polarisation. */
export interface FoldConstants {
  kappa: number;
  cPerp: number;
  cPar: number;
  dPerp: number;
  dPar: number;
}

/** The fold's uniform-form constants, read off the sweep at its rainbow ray (what planeBowTable's header holds). */
export function foldConstants(sweep: PlaneSweep, fold: PlaneFold): FoldConstants {
  const w = weightsAt(sweep, fold, fold.uR);
  const at = (weights: Float64Array, values: Float64Array) => applyCubic(weights, w.first, values);
  const curvature = Math.abs(at(w.curvature, sweep.thetaSigned));
  const offsetSlope = Math.abs(at(w.slope, sweep.offset));
  // The two incident polarisations add incoherently (PlaneTracer.planeRay): C and D sum over co- and cross-polar terms.
  const squares = (weights: Float64Array, co: Float64Array, cross: Float64Array) => at(weights, co) ** 2 + at(weights, cross) ** 2;
  const cScale = (4 * Math.PI * 2 ** (-1 / 3) * offsetSlope ** (1 / 3)) / curvature ** (2 / 3);
  const dScale = (4 * Math.PI * 2 ** (1 / 3)) / (offsetSlope ** (1 / 3) * curvature ** (4 / 3));
  return {
    kappa: offsetSlope ** (2 / 3) * Math.cbrt(2 / curvature),
    cPerp: cScale * squares(w.value, sweep.perpAmp, sweep.perpCross),
    cPar: cScale * squares(w.value, sweep.parAmp, sweep.parCross),
    dPerp: dScale * squares(w.slope, sweep.perpAmp, sweep.perpCross),
    dPar: dScale * squares(w.slope, sweep.parAmp, sweep.parCross),
  };
}

/** The ray of the piece [first, last] (plus the fold's end) reaching Θ = target; null if the piece does not reach it. */
function rootInPiece(sweep: PlaneSweep, side: 1 | -1, fold: PlaneFold, piece: [number, number], atFoldEnd: "first" | "last", target: number): FoldRay | null {
  // Nodes of the piece in index order, with the fold itself at its end (read in place: pieces are long).
  const count = piece[1] - piece[0] + 2;
  const offset = atFoldEnd === "first" ? -1 : 0;
  const isFold = (k: number) => (atFoldEnd === "first" ? k === 0 : k === count - 1);
  const uAt = (k: number) => (isFold(k) ? fold.uR : sweep.u[piece[0] + k + offset]);
  const tAt = (k: number) => (isFold(k) ? fold.thetaR : side * sweep.thetaSigned[piece[0] + k + offset]);
  // Θ is monotone along the piece: bisect the nodes for the bracketing pair.
  const rising = tAt(count - 1) > tAt(0);
  const lowT = rising ? tAt(0) : tAt(count - 1);
  const highT = rising ? tAt(count - 1) : tAt(0);
  if (!(target >= lowT && target <= highT)) return null;
  let i = 0;
  let j = count - 1;
  while (j - i > 1) {
    const m = (i + j) >> 1;
    if (tAt(m) < target === rising) i = m;
    else j = m;
  }
  const thetaAt = (u: number) => side * applyCubic(weightsAt(sweep, fold, u).value, cubic.first, sweep.thetaSigned);
  // Illinois regula falsi between the bracketing nodes (Press et al. 2007 §9.2), on the interpolated Θ(u).
  let ua = uAt(i);
  let fa = tAt(i) - target;
  let ub = uAt(j);
  let fb = tAt(j) - target;
  let keep = 0;
  let u = ua;
  for (let it = 0; it < ROOT_STEPS; it++) {
    u = fb === fa ? 0.5 * (ua + ub) : ub - (fb * (ub - ua)) / (fb - fa);
    if (!(u > Math.min(ua, ub) && u < Math.max(ua, ub))) u = 0.5 * (ua + ub);
    const f = thetaAt(u) - target;
    if (Math.abs(f) < ROOT_TOLERANCE_RAD || Math.abs(ub - ua) < 1e-15) break;
    if (f * fb < 0) {
      ua = ub;
      fa = fb;
      keep = 0;
    } else if (++keep >= 1) {
      fa *= 0.5;
    }
    ub = u;
    fb = f;
  }
  const w = weightsAt(sweep, fold, u);
  const root = 1 / Math.sqrt(Math.abs(applyCubic(w.slope, w.first, sweep.thetaSigned)));
  return {
    u,
    path: applyCubic(w.value, w.first, sweep.path),
    perp: applyCubic(w.value, w.first, sweep.perpAmp, root),
    par: applyCubic(w.value, w.first, sweep.parAmp, root),
    perpCross: applyCubic(w.value, w.first, sweep.perpCross, root),
    parCross: applyCubic(w.value, w.first, sweep.parCross, root),
  };
}

/** The fold's two rays (inner piece, outer piece) at Θ = targetRad on its lit side; null where either piece ends first. */
export function foldPair(sweep: PlaneSweep, side: 1 | -1, fold: PlaneFold, targetRad: number): [FoldRay, FoldRay] | null {
  const inner = rootInPiece(sweep, side, fold, fold.inner, "last", targetRad);
  const outer = rootInPiece(sweep, side, fold, fold.outer, "first", targetRad);
  return inner === null || outer === null ? null : [inner, outer];
}

/** The fold of the sweep's order nearest the sphere's bow of index n (findFold); null if the order has none there. */
export function bowFold(n: number, sweep: PlaneSweep, side: 1 | -1): PlaneFold | null {
  const descartes = rainbowImpactParameter(n, sweep.order - 1);
  if (descartes === null) return null;
  const nearRad = scatteringAngleOfDeviation(deviationRad(n, sweep.order - 1, descartes)).angle;
  return findFold(sweep, side, nearRad);
}

/**
 * The uniform bow table of one order in one half-plane on bins of width stepDeg centred on thetaDeg, with the
 * segments of the fold's two pieces marked in `pairSegments` (their light is in the table; the other segments of
 * the order are the caller's, as ray optics). Null when the order has no fold in this half-plane.
 */
export function planeBowTable(
  tracer: { setup: Pick<DropTraceSetup, "n"> },
  sweep: PlaneSweep,
  side: 1 | -1,
  thetaDeg: Float64Array,
  stepDeg: number,
): { table: UniformBowTable; pairSegments: Uint8Array; fold: PlaneFold; constants: FoldConstants } | null {
  const fold = bowFold(tracer.setup.n, sweep, side);
  if (fold === null) return null;
  const constants = foldConstants(sweep, fold);
  const count = thetaDeg.length;
  const pairSegments = new Uint8Array(sweep.u.length);
  for (let s = fold.inner[0]; s < fold.outer[1]; s++) pairSegments[s] = 1;
  const halfFirstDeg = thetaDeg[0] - stepDeg / 2;
  interface AtAngle {
    zHat: number;
    single: boolean;
    pair: [FoldRay, FoldRay] | null;
  }
  const at = (m: number): AtAngle => {
    const target = (halfFirstDeg + (m * stepDeg) / 2) * DEG;
    const lit = (fold.litAbove ? 1 : -1) * (target - fold.thetaR);
    if (lit <= 0) return { zHat: -constants.kappa * -lit, single: false, pair: null };
    const pair = foldPair(sweep, side, fold, target);
    if (pair === null) return { zHat: Number.NaN, single: true, pair: null };
    return { zHat: Math.cbrt(0.75 * Math.abs(pair[0].path - pair[1].path)) ** 2, single: false, pair };
  };
  const { zHatEdges, singleEdge } = binEdges(count, at);
  const table: UniformBowTable = {
    zHatEdges,
    uPerp: new Float64Array(count),
    uPar: new Float64Array(count),
    vPerp: new Float64Array(count),
    vPar: new Float64Array(count),
    otherPerp: new Float64Array(count),
    otherPar: new Float64Array(count),
    uniform: new Uint8Array(count),
  };
  for (let j = 0; j < count; j++) {
    if (singleEdge[j] || singleEdge[j + 1] || !(Math.sin(thetaDeg[j] * DEG) > 0)) continue;
    const centre = at(2 * j + 1);
    if (centre.single) continue;
    table.uniform[j] = 1;
    if (centre.pair === null) {
      table.uPerp[j] = constants.cPerp;
      table.uPar[j] = constants.cPar;
      table.vPerp[j] = constants.dPerp;
      table.vPar[j] = constants.dPar;
      continue;
    }
    const [r1, r2] = centre.pair;
    const z = centre.zHat;
    // Co- and cross-polar terms each interfere between the two rays; their powers add (PlaneTracer.planeRay).
    const sums = (a: number, b: number, c: number, d: number) => (a + b) ** 2 + (c + d) ** 2;
    const differences = (a: number, b: number, c: number, d: number) => (a - b) ** 2 + (c - d) ** 2;
    table.uPerp[j] = Math.PI * sums(r1.perp, r2.perp, r1.perpCross, r2.perpCross) * Math.sqrt(z);
    table.uPar[j] = Math.PI * sums(r1.par, r2.par, r1.parCross, r2.parCross) * Math.sqrt(z);
    table.vPerp[j] = (Math.PI * differences(r1.perp, r2.perp, r1.perpCross, r2.perpCross)) / Math.sqrt(z);
    table.vPar[j] = (Math.PI * differences(r1.par, r2.par, r1.parCross, r2.parCross)) / Math.sqrt(z);
  }
  return { table, pairSegments, fold, constants };
}
