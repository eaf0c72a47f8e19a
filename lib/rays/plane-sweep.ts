// The rays of one order that leave a drop within one scattering plane. The plane holds the incident direction
// d_in and the unit vector e (the side the light is deflected to); N = d_in × e is its normal. A ray enters at
// pupil point (u, v) (u along e, v along N); for each u the offset v*(u) whose exit direction lies in the plane
// (d_out·N = 0) is found by Newton's method. For a sphere v* = 0; for a tilted or flattened drop the curve bends.
// The intensity that curve carries into the plane follows from the Jacobian of (Θ, Y) over (u, v), Y = d_out·N:
// near the plane dΩ = dΘ·dY, so a ray's |S|²/x² = |A|²/|∂(Θ,Y)/∂(u,v)| (van de Hulst 1957 §12.22 divergence
// factor in two dimensions; Glantschnig & Chen 1981, Appl. Opt. 20, 2499 use the same for spheroids, from memory).

import { allocateTrace, AT, ORDER_STRIDE, traceDrop, type DropTraceSetup, type TraceOutput } from "./shape-tracer.js";

export type Vec3 = readonly [number, number, number];

export interface ScatteringPlane {
  /** Unit incident direction (the way the sunlight travels). */
  dIn: Vec3;
  /** Unit vector ⟂ dIn towards which this half-plane's light is deflected. */
  e: Vec3;
}

/** One ray of one order that leaves in the plane. */
export interface PlaneRay {
  u: number;
  v: number;
  /** Signed angle of d_out from d_in towards e, radians in (−π, π]. */
  thetaSigned: number;
  /** ∂Y/∂v and the Jacobian ∂(Θ, Y)/∂(u, v) (det only when asked for). */
  yv: number;
  det: number;
  /** Signed amplitudes of the field ⟂ and ∥ to the scattering plane (unpolarised light; see planeRay). */
  ampPerp: number;
  ampPar: number;
  /** Far-field optical path W in units of a (x·W is the phase). */
  path: number;
  /** Offset of the exit ray from the drop's centre, along N × d_out (in the plane, ⟂ d_out). */
  offset: number;
}

/** Step of the finite differences in the pupil, in units of a: √ε of the unit scale (Press et al. 2007 §5.7). */
const PUPIL_STEP = 1e-7;
/** |Y| below this counts as in the plane. */
const IN_PLANE = 1e-13;
const NEWTON_STEPS = 12;

export class PlaneTracer {
  readonly setup: DropTraceSetup;
  readonly plane: ScatteringPlane;
  readonly normal: Vec3;
  private readonly trace: TraceOutput;
  /** The setup cut at each order: a ray of order p is traced no further than its p-th chord (orders 0 and 2 cost less). */
  private readonly upTo: DropTraceSetup[];
  private readonly launch: number;
  private readonly parIn: Vec3;

  constructor(setup: DropTraceSetup, plane: ScatteringPlane) {
    this.setup = setup;
    this.plane = plane;
    const [a, b] = [plane.dIn, plane.e];
    this.normal = [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
    const nrm = this.normal;
    // Incident parallel basis e∥ = e⊥ × d_in (and e∥_out = e⊥ × d_out at the exit): the same handedness both sides.
    this.parIn = [nrm[1] * a[2] - nrm[2] * a[1], nrm[2] * a[0] - nrm[0] * a[2], nrm[0] * a[1] - nrm[1] * a[0]];
    this.trace = allocateTrace(setup.maxOrder);
    this.upTo = Array.from({ length: setup.maxOrder + 1 }, (_, p) => ({ ...setup, maxOrder: p }));
    this.launch = 2 * setup.outline.maxRadius + 1;
  }

  private readonly o = new Float64Array(3);
  /** Traces the pupil point (u, v); false if the ray misses or order p does not leave. */
  traceAt(u: number, v: number, p: number): boolean {
    const { dIn, e } = this.plane;
    const n = this.normal;
    for (let c = 0; c < 3; c++) this.o[c] = u * e[c] + v * n[c] - this.launch * dIn[c];
    traceDrop(this.upTo[p], this.o, dIn, n, this.parIn, this.trace);
    return this.trace.hit && this.trace.orders[p * ORDER_STRIDE + AT.valid] === 1;
  }

  /** Y = d_out·N and Θ (signed) of the last trace's order p. */
  private exitAngles(p: number): { y: number; theta: number } {
    const rec = this.trace.orders;
    const at = p * ORDER_STRIDE + AT.dir;
    const { dIn, e } = this.plane;
    const n = this.normal;
    const dx = rec[at];
    const dy = rec[at + 1];
    const dz = rec[at + 2];
    return {
      y: dx * n[0] + dy * n[1] + dz * n[2],
      theta: Math.atan2(dx * e[0] + dy * e[1] + dz * e[2], dx * dIn[0] + dy * dIn[1] + dz * dIn[2]),
    };
  }

  /**
   * The ray of order p through pupil abscissa u that leaves in the plane, starting Newton's search at vGuess;
   * null if none is found. With withDet the Jacobian determinant is computed too (one more trace).
   */
  planeRay(u: number, vGuess: number, p: number, withDet = false): PlaneRay | null {
    let v = vGuess;
    let y = 0;
    let yv = 0;
    let theta = 0;
    let thetaV = 0;
    let converged = false;
    for (let step = 0; step < NEWTON_STEPS; step++) {
      if (!this.traceAt(u, v + PUPIL_STEP, p)) return null;
      const ahead = this.exitAngles(p);
      if (!this.traceAt(u, v, p)) return null;
      const here = this.exitAngles(p);
      y = here.y;
      theta = here.theta;
      yv = (ahead.y - y) / PUPIL_STEP;
      thetaV = unwrap(ahead.theta - theta) / PUPIL_STEP;
      if (Math.abs(y) < IN_PLANE) {
        converged = true;
        break;
      }
      if (!(yv !== 0 && Number.isFinite(yv))) return null;
      v -= y / yv;
    }
    if (!converged) return null;
    // The trace of (u, v) is the last one made: read its fields and path before any other trace.
    const rec = this.trace.orders;
    const base = p * ORDER_STRIDE;
    const dOut: Vec3 = [rec[base + AT.dir], rec[base + AT.dir + 1], rec[base + AT.dir + 2]];
    const nrm = this.normal;
    const parOut: Vec3 = [
      nrm[1] * dOut[2] - nrm[2] * dOut[1],
      nrm[2] * dOut[0] - nrm[0] * dOut[2],
      nrm[0] * dOut[1] - nrm[1] * dOut[0],
    ];
    const dot = (offset: number, basis: Vec3) =>
      rec[base + offset] * basis[0] + rec[base + offset + 1] * basis[1] + rec[base + offset + 2] * basis[2];
    // Amplitude matrix: incident ⟂ (e1 = N) and ∥ (e2) into outgoing ⟂ (N) and ∥ (N × d_out), complex.
    const pp = [dot(AT.e1Re, nrm), dot(AT.e1Im, nrm)];
    const parFromPerp = [dot(AT.e1Re, parOut), dot(AT.e1Im, parOut)];
    const perpFromPar = [dot(AT.e2Re, nrm), dot(AT.e2Im, nrm)];
    const qq = [dot(AT.e2Re, parOut), dot(AT.e2Im, parOut)];
    // For unpolarised light each outgoing component's power sums both incident ones; the sign of the main
    // (diagonal) term is kept for the interference of the two rays of a bow.
    const perpPower = pp[0] ** 2 + pp[1] ** 2 + perpFromPar[0] ** 2 + perpFromPar[1] ** 2;
    const parPower = qq[0] ** 2 + qq[1] ** 2 + parFromPerp[0] ** 2 + parFromPerp[1] ** 2;
    const exit: Vec3 = [rec[base + AT.point], rec[base + AT.point + 1], rec[base + AT.point + 2]];
    const path = rec[base + AT.path];
    const offset = exit[0] * parOut[0] + exit[1] * parOut[1] + exit[2] * parOut[2];
    let det = Number.NaN;
    if (withDet) {
      if (!this.traceAt(u + PUPIL_STEP, v, p)) return null;
      const side = this.exitAngles(p);
      const thetaU = unwrap(side.theta - theta) / PUPIL_STEP;
      const yu = (side.y - y) / PUPIL_STEP;
      det = thetaU * yv - thetaV * yu;
    }
    return {
      u,
      v,
      thetaSigned: theta,
      yv,
      det,
      ampPerp: Math.sign(pp[0] || 1) * Math.sqrt(perpPower),
      ampPar: Math.sign(qq[0] || 1) * Math.sqrt(parPower),
      path,
      offset,
    };
  }

  /** Largest u (along e, at v = 0) whose ray meets the drop: the pupil's half-width, by bisection. */
  pupilHalfWidth(sign: 1 | -1): number {
    let lo = 0;
    let hi = this.setup.outline.maxRadius * 1.01;
    for (let it = 0; it < 60; it++) {
      const mid = 0.5 * (lo + hi);
      if (this.traceAt(sign * mid, 0, 0)) lo = mid;
      else hi = mid;
    }
    return lo;
  }
}

/** An angle difference brought into (−π, π]. */
function unwrap(delta: number): number {
  if (delta > Math.PI) return delta - 2 * Math.PI;
  if (delta <= -Math.PI) return delta + 2 * Math.PI;
  return delta;
}

/** Rays of one order at pupil abscissae u_s = U·sin(π s/2S), s = −S … S (they crowd towards the rim, where Θ turns fastest). */
export interface PlaneSweep {
  order: number;
  u: Float64Array;
  ok: Uint8Array;
  thetaSigned: Float64Array;
  /** |A_j|²/|∂Y/∂v|: power per unit u and unit Y, ⟂ and ∥. */
  perpPerU: Float64Array;
  parPerU: Float64Array;
  /** The same as signed amplitudes Ã = A/√|∂Y/∂v| (the sign kept for the interference of a bow's two rays). */
  perpAmp: Float64Array;
  parAmp: Float64Array;
  /** Far-field optical path W and exit offset (PlaneRay's path and offset). */
  path: Float64Array;
  offset: Float64Array;
  v: Float64Array;
}

/** The part of the pupil a sweep traces, and where Newton's search restarts after a gap. */
export interface SweepWindow {
  wants(u: number): boolean;
  /** A starting v at u after a gap (a ray found nearby). */
  guess(u: number): number;
}

/** window: trace only the rays it wants (the others stay ok = 0). */
export function sweepPlane(tracer: PlaneTracer, p: number, halfSegments: number, window?: SweepWindow): PlaneSweep {
  const sweep = emptySweep(p, new Float64Array(2 * halfSegments + 1));
  for (const sign of [1, -1] as const) {
    // The pupil's edge is found at v = 0; where the curve v*(u) bends, rays near the rim may miss and are skipped.
    const half = tracer.pupilHalfWidth(sign);
    let vGuess = 0;
    let gap = false;
    for (let s = sign === 1 ? 0 : 1; s <= halfSegments; s++) {
      const index = halfSegments + sign * s;
      const u = sign * half * Math.sin((Math.PI * s) / (2 * halfSegments));
      sweep.u[index] = u;
      if (window && !window.wants(u)) {
        gap = true;
        continue;
      }
      if (gap) {
        vGuess = window!.guess(u);
        gap = false;
      }
      const ray = tracer.planeRay(u, vGuess, p);
      if (ray === null) continue;
      vGuess = ray.v;
      storeRay(sweep, index, ray);
    }
  }
  return sweep;
}

/** A sweep of order p over the pupil samples u with no ray yet (ok = 0 everywhere). */
export function emptySweep(p: number, u: Float64Array): PlaneSweep {
  const count = u.length;
  return {
    order: p,
    u,
    ok: new Uint8Array(count),
    thetaSigned: new Float64Array(count),
    perpPerU: new Float64Array(count),
    parPerU: new Float64Array(count),
    perpAmp: new Float64Array(count),
    parAmp: new Float64Array(count),
    path: new Float64Array(count),
    offset: new Float64Array(count),
    v: new Float64Array(count),
  };
}

/** Writes a traced ray into sample `index` of a sweep (the sample's u is the ray's). */
export function storeRay(sweep: PlaneSweep, index: number, ray: PlaneRay): void {
  sweep.ok[index] = 1;
  sweep.thetaSigned[index] = ray.thetaSigned;
  sweep.v[index] = ray.v;
  const root = Math.sqrt(Math.abs(ray.yv));
  sweep.perpAmp[index] = ray.ampPerp / root;
  sweep.parAmp[index] = ray.ampPar / root;
  sweep.perpPerU[index] = sweep.perpAmp[index] ** 2;
  sweep.parPerU[index] = sweep.parAmp[index] ** 2;
  sweep.path[index] = ray.path;
  sweep.offset[index] = ray.offset;
}
