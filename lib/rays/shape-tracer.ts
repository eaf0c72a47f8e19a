// Rays through an axisymmetric drop of any outline, in 3D: each surface hit splits the ray by Fresnel's
// coefficients (lib/rays/fresnel.ts) into a reflected and a transmitted ray, and the electric field of two
// incident polarisations is carried as complex 3-vectors, so depolarisation by a tilted or flattened drop is kept.
// Order p counts the chords inside the drop: 0 external reflection, 1 straight through, 2 primary bow, 3 secondary.
// Lengths are in units of a, the radius of the sphere of equal volume.

import { interfaceAmplitudes, type InterfaceAmplitudes } from "./fresnel.js";
import type { DropOutline } from "../drops/shape/outline.js";

export interface DropTraceSetup {
  outline: DropOutline;
  /** Unit vector along the drop's symmetry axis, pointing up (away from θ = 0, the downward pole). */
  axis: readonly [number, number, number];
  /** Refractive index of the drop relative to the air. */
  n: number;
  /** Power absorbed per unit path inside, in units of 1/a: 4πκa/λ = 2κx (Bohren & Huffman 1983 Eq. 2.52). */
  absorptionPerRadius: number;
  /** Highest order traced. */
  maxOrder: number;
}

/** Numbers stored per order in a trace's output. */
export const ORDER_STRIDE = 26;
/** Offsets within one order's record; dirV, pointV: d(dir)/dv and d(point)/dv when the trace carries a ray differential (traceDrop's originV). */
export const AT = { valid: 0, dir: 1, point: 4, path: 7, e1Re: 8, e1Im: 11, e2Re: 14, e2Im: 17, dirV: 20, pointV: 23 } as const;

export interface TraceOutput {
  /** ORDER_STRIDE numbers per order 0 … maxOrder (see AT); valid = 0 where the order did not leave the drop. */
  orders: Float64Array;
  /** Power absorbed inside and power still inside after the last traced chord, for each incident polarisation. */
  absorbed: Float64Array;
  remaining: Float64Array;
  /** Whether the ray met the drop at all. */
  hit: boolean;
}

export function allocateTrace(maxOrder: number): TraceOutput {
  return {
    orders: new Float64Array((maxOrder + 1) * ORDER_STRIDE),
    absorbed: new Float64Array(2),
    remaining: new Float64Array(2),
    hit: false,
  };
}

// Surface F(p) = |p| − r(μ), μ = −p̂·axis; ∇F = p̂ + r′(μ)(axis + μ p̂)/|p| (chain rule on μ = −p·axis/|p|).
const grad = new Float64Array(3);
function surface(setup: DropTraceSetup, x: number, y: number, z: number): number {
  const len = Math.sqrt(x * x + y * y + z * z);
  const axis = setup.axis;
  const ax = axis[0];
  const ay = axis[1];
  const az = axis[2];
  const mu = -(x * ax + y * ay + z * az) / len;
  return len - setup.outline.radius(mu);
}
// At the point of the last surfaceGradient: |p|, p̂, μ, |∇F| (wallPoint) and r(μ), r′(μ), r″(μ) (terms), which
// normalDifferential reads at the same wall point.
const terms = new Float64Array(3);
const WALL = { len: 0, px: 1, py: 2, pz: 3, mu: 4, gradNorm: 5 } as const;
const wallPoint = new Float64Array(6);
/**
 * F at p, with ∇F (unnormalised) into grad: one evaluation of the outline for both. With curvature (a wall point's
 * normal, surfaceGradient), r″(μ) into terms and |p|, p̂, μ into wallPoint too; the root search's steps skip them.
 */
function wallAt(setup: DropTraceSetup, x: number, y: number, z: number, curvature: boolean): number {
  const len = Math.sqrt(x * x + y * y + z * z);
  const axis = setup.axis;
  const ax = axis[0];
  const ay = axis[1];
  const az = axis[2];
  const px = x / len;
  const py = y / len;
  const pz = z / len;
  const mu = -(px * ax + py * ay + pz * az);
  if (curvature) setup.outline.radiusTerms(mu, terms);
  else setup.outline.radiusAndSlope(mu, terms);
  const k = terms[1] / len;
  grad[0] = px + k * (ax + mu * px);
  grad[1] = py + k * (ay + mu * py);
  grad[2] = pz + k * (az + mu * pz);
  if (curvature) {
    wallPoint[WALL.len] = len;
    wallPoint[WALL.px] = px;
    wallPoint[WALL.py] = py;
    wallPoint[WALL.pz] = pz;
    wallPoint[WALL.mu] = mu;
  }
  return len - terms[0];
}
/** The unit outward normal at p, into grad; the wall's terms there into wallPoint and terms (for normalDifferential). */
function surfaceGradient(setup: DropTraceSetup, x: number, y: number, z: number): void {
  wallAt(setup, x, y, z, true);
  const g = Math.sqrt(grad[0] * grad[0] + grad[1] * grad[1] + grad[2] * grad[2]);
  grad[0] /= g;
  grad[1] /= g;
  grad[2] /= g;
  wallPoint[WALL.gradNorm] = g;
}

/**
 * A first guess of where the line o + t·d crosses the wall near its crossing tBound of the bounding sphere: the crossing
 * of the sphere of the wall's radius r(μ) in the direction of that point (exact for a sphere, and within the change of
 * r between the two directions otherwise). NaN if the line misses that sphere.
 */
function sphereGuess(setup: DropTraceSetup, o: Float64Array, d: Float64Array, tBound: number, entry: boolean): number {
  const x = o[0] + tBound * d[0];
  const y = o[1] + tBound * d[1];
  const z = o[2] + tBound * d[2];
  const axis = setup.axis;
  const ax = axis[0];
  const ay = axis[1];
  const az = axis[2];
  const mu = -(x * ax + y * ay + z * az) / Math.sqrt(x * x + y * y + z * z);
  return boundingExit(o[0], o[1], o[2], d[0], d[1], d[2], setup.outline.radius(mu), entry);
}

/** Steps that bracket an entry point when the line's closest approach to the centre lies outside the drop. */
const BRACKET_STEPS = 24;
/** Just inside the wall: where the search for the next wall starts (a ray leaving the wall inwards is inside there). */
const START_INSIDE = 1e-9;
/** Roots are polished to this fraction of a: below it a path difference is under 1e-9 of a wave for x < 1e5. */
const ROOT_TOLERANCE = 1e-14;
/**
 * Newton's last step: after a step δ the error is about (F″/2F′)·δ² (quadratic convergence, Press et al. 2007
 * Numerical Recipes §9.4, from memory). F″ along the ray is the wall's normal curvature, a few 1/a at most for the
 * tabulated outlines (common practice: bound it by 2), so δ² < ROOT_TOLERANCE·|F′| leaves the root within
 * ROOT_TOLERANCE, one step sooner than |δ| < ROOT_TOLERANCE; near grazing (F′ → 0) the rule asks for the smaller steps.
 */
function lastStep(step: number, slope: number): boolean {
  return step * step < ROOT_TOLERANCE * Math.abs(slope);
}

/** t of the bounding sphere |o + t d| = R (larger root), or NaN if the line misses it. */
function boundingExit(ox: number, oy: number, oz: number, dx: number, dy: number, dz: number, radius: number, entry: boolean): number {
  const b = ox * dx + oy * dy + oz * dz;
  const c = ox * ox + oy * oy + oz * oz - radius * radius;
  const disc = b * b - c;
  if (disc < 0) return Number.NaN;
  const root = Math.sqrt(disc);
  return entry ? -b - root : -b + root;
}

/**
 * First t in (tStart, tEnd] where F along the ray changes sign from `fromSign`; NaN if none. Bisection safeguarded
 * Newton on the bracket (Press et al. 2007, Numerical Recipes §9.4 rtsafe).
 */
function crossing(setup: DropTraceSetup, o: Float64Array, d: Float64Array, tStart: number, tEnd: number, fromSign: number): number {
  let tPrev = tStart;
  let fPrev = fromSign;
  const step = (tEnd - tStart) / BRACKET_STEPS;
  for (let s = 1; s <= BRACKET_STEPS; s++) {
    const t = tStart + s * step;
    const f = surface(setup, o[0] + t * d[0], o[1] + t * d[1], o[2] + t * d[2]);
    if (f * fromSign <= 0) return polish(setup, o, d, tPrev, t, fPrev);
    tPrev = t;
    fPrev = f;
  }
  return Number.NaN;
}

function polish(setup: DropTraceSetup, o: Float64Array, d: Float64Array, lo: number, hi: number, fLo: number, start = Number.NaN): number {
  // Newton's steps from the outer end of the bracket approach a convex wall from outside without overshooting; a start
  // inside the bracket is taken when given (the steps are safeguarded by the bracket either way).
  let t = start > lo && start < hi ? start : fLo > 0 ? lo : hi;
  for (let it = 0; it < 60; it++) {
    const x = o[0] + t * d[0];
    const y = o[1] + t * d[1];
    const z = o[2] + t * d[2];
    const f = wallAt(setup, x, y, z, false);
    if (f === 0) return t;
    if ((f > 0) === (fLo > 0)) lo = t;
    else hi = t;
    // Newton's step with the exact dF/dt = ∇F·d (quadratic convergence: measured 6.3 steps a root with the unit
    // normal's n̂·d = dF/dt/|∇F| instead, linear where |∇F| > 1 off the sphere).
    const slope = grad[0] * d[0] + grad[1] * d[1] + grad[2] * d[2];
    let next = slope !== 0 ? t - f / slope : Number.NaN;
    const newton = next > lo && next < hi;
    if (!newton) next = 0.5 * (lo + hi);
    if ((newton && lastStep(next - t, slope)) || hi - lo < ROOT_TOLERANCE) return next;
    t = next;
  }
  return t;
}

// Scratch for the field bookkeeping (complex 3-vectors as re/im triples).
const fresnel: InterfaceAmplitudes = { rPerpRe: 0, rPerpIm: 0, rParRe: 0, rParIm: 0, tPerp: 0, tPar: 0, cosRefraction: 0 };
const sVec = new Float64Array(3);
const pIn = new Float64Array(3);
const pRef = new Float64Array(3);
const pTr = new Float64Array(3);
const kRef = new Float64Array(3);
const kTr = new Float64Array(3);
const field = new Float64Array(12);
const reflected = new Float64Array(12);
const transmitted = new Float64Array(12);

function cross(a: ArrayLike<number>, b: ArrayLike<number>, out: Float64Array): void {
  const x = a[1] * b[2] - a[2] * b[1];
  const y = a[2] * b[0] - a[0] * b[2];
  const z = a[0] * b[1] - a[1] * b[0];
  out[0] = x;
  out[1] = y;
  out[2] = z;
}

/**
 * Splits the fields in `field` at a surface with unit normal ν facing the incident side, incident direction k,
 * from index n1 into n2: directions into kRef/kTr, fields into reflected/transmitted. Returns false under total
 * internal reflection (no transmitted ray).
 */
function split(k: Float64Array, nu: Float64Array, n1: number, n2: number): boolean {
  const cosI = -(k[0] * nu[0] + k[1] * nu[1] + k[2] * nu[2]);
  interfaceAmplitudes(n1, n2, cosI, fresnel);
  cross(k, nu, sVec);
  let sLen = Math.sqrt(sVec[0] * sVec[0] + sVec[1] * sVec[1] + sVec[2] * sVec[2]);
  if (sLen < 1e-12) {
    // Normal incidence: any s ⟂ k will do.
    const helper = Math.abs(k[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
    cross(k, helper, sVec);
    sLen = Math.sqrt(sVec[0] * sVec[0] + sVec[1] * sVec[1] + sVec[2] * sVec[2]);
  }
  sVec[0] /= sLen;
  sVec[1] /= sLen;
  sVec[2] /= sLen;
  for (let c = 0; c < 3; c++) kRef[c] = k[c] + 2 * cosI * nu[c];
  const total = fresnel.tPerp === 0 && fresnel.tPar === 0;
  if (!total) {
    const ratio = n1 / n2;
    const along = ratio * cosI - fresnel.cosRefraction;
    for (let c = 0; c < 3; c++) kTr[c] = ratio * k[c] + along * nu[c];
    const len = Math.sqrt(kTr[0] * kTr[0] + kTr[1] * kTr[1] + kTr[2] * kTr[2]);
    for (let c = 0; c < 3; c++) kTr[c] /= len;
  }
  cross(sVec, k, pIn);
  cross(sVec, kRef, pRef);
  if (!total) cross(sVec, kTr, pTr);
  // Two polarisations × (re, im): field[6q + 3·part + c].
  for (let q = 0; q < 2; q++) {
    const b = 6 * q;
    const sRe = field[b] * sVec[0] + field[b + 1] * sVec[1] + field[b + 2] * sVec[2];
    const sIm = field[b + 3] * sVec[0] + field[b + 4] * sVec[1] + field[b + 5] * sVec[2];
    const pRe = field[b] * pIn[0] + field[b + 1] * pIn[1] + field[b + 2] * pIn[2];
    const pIm = field[b + 3] * pIn[0] + field[b + 4] * pIn[1] + field[b + 5] * pIn[2];
    const rsRe = fresnel.rPerpRe * sRe - fresnel.rPerpIm * sIm;
    const rsIm = fresnel.rPerpRe * sIm + fresnel.rPerpIm * sRe;
    const rpRe = fresnel.rParRe * pRe - fresnel.rParIm * pIm;
    const rpIm = fresnel.rParRe * pIm + fresnel.rParIm * pRe;
    for (let c = 0; c < 3; c++) {
      reflected[b + c] = rsRe * sVec[c] + rpRe * pRef[c];
      reflected[b + 3 + c] = rsIm * sVec[c] + rpIm * pRef[c];
      transmitted[b + c] = total ? 0 : fresnel.tPerp * sRe * sVec[c] + fresnel.tPar * pRe * pTr[c];
      transmitted[b + 3 + c] = total ? 0 : fresnel.tPerp * sIm * sVec[c] + fresnel.tPar * pIm * pTr[c];
    }
  }
  return !total;
}

function power(f: Float64Array, q: number): number {
  let sum = 0;
  for (let c = 0; c < 6; c++) sum += f[6 * q + c] * f[6 * q + c];
  return sum;
}

const origin = new Float64Array(3);
const dir = new Float64Array(3);
const point = new Float64Array(3);
const normal = new Float64Array(3);

// A ray differential (Igehy 1999, "Tracing ray differentials", SIGGRAPH '99, 179–186, §3, from memory): the
// derivatives of the ray's point and direction with respect to a parameter v of the incident ray, carried through each
// transfer, reflection and refraction, so that an order's d(dir)/dv comes with one trace instead of a second, offset one.
const pointV = new Float64Array(3);
const dirV = new Float64Array(3);
const normalV = new Float64Array(3);
const kRefV = new Float64Array(3);
const kTrV = new Float64Array(3);

/**
 * Transfer of the differential to the wall point reached at t along dir from the previous point (Igehy 1999 Eq. 10 and
 * 12; his addendum at graphics.stanford.edu/papers/trd proves Eq. 12 for any surface):
 * dt/dv = −ν·(P_v + t·D_v)/(ν·D), P′_v = P_v + t·D_v + (dt/dv)·D, with ν ∝ grad (any sign or length).
 */
function transferDifferential(t: number): void {
  for (let c = 0; c < 3; c++) pointV[c] += t * dirV[c];
  const tV = -(grad[0] * pointV[0] + grad[1] * pointV[1] + grad[2] * pointV[2]) / (grad[0] * dir[0] + grad[1] * dir[1] + grad[2] * dir[2]);
  for (let c = 0; c < 3; c++) pointV[c] += tV * dir[c];
}

/**
 * dν/dv of the unit normal facing the incident side (ν = sign·∇F/|∇F|) as the point moves by w = P_v along the wall,
 * at the point of the last surfaceGradient, into normalV: dν = (I − νν)·(∇∇F·w)/|∇F|, with ∇∇F·w the change of
 * ∇F = p̂ + k(â + μp̂), k = r′(μ)/|p|, μ = −â·p̂ (the gradient above, differentiated by the chain rule):
 * dp̂ = (w − p̂(p̂·w))/|p|, dμ = −â·dp̂, dk = r″dμ/|p| − r′(p̂·w)/|p|².
 */
function normalDifferential(setup: DropTraceSetup, sign: number): void {
  const axis = setup.axis;
  const ax = axis[0];
  const ay = axis[1];
  const az = axis[2];
  const len = wallPoint[WALL.len];
  const mu = wallPoint[WALL.mu];
  const atPx = wallPoint[WALL.px];
  const atPy = wallPoint[WALL.py];
  const atPz = wallPoint[WALL.pz];
  const wx = pointV[0];
  const wy = pointV[1];
  const wz = pointV[2];
  const pw = atPx * wx + atPy * wy + atPz * wz;
  const dpx = (wx - atPx * pw) / len;
  const dpy = (wy - atPy * pw) / len;
  const dpz = (wz - atPz * pw) / len;
  const dmu = -(ax * dpx + ay * dpy + az * dpz);
  const k = terms[1] / len;
  const dk = (terms[2] * dmu) / len - (terms[1] * pw) / (len * len);
  const gx = dpx + dk * (ax + mu * atPx) + k * (dmu * atPx + mu * dpx);
  const gy = dpy + dk * (ay + mu * atPy) + k * (dmu * atPy + mu * dpy);
  const gz = dpz + dk * (az + mu * atPz) + k * (dmu * atPz + mu * dpz);
  const along = grad[0] * gx + grad[1] * gy + grad[2] * gz;
  const scale = sign / wallPoint[WALL.gradNorm];
  normalV[0] = scale * (gx - grad[0] * along);
  normalV[1] = scale * (gy - grad[1] * along);
  normalV[2] = scale * (gz - grad[2] * along);
}

/**
 * d/dv of the reflected and refracted directions of split(k, ν, n1, n2), the derivatives (as Igehy 1999 §3 takes them,
 * from memory) of the law of reflection kRef = k + 2 cos i·ν and of Snell's law in vector form
 * kTr = (n1/n2)·k + ((n1/n2)·cos i − cos t)·ν, cos i = −k·ν, cos t = √(1 − (n1/n2)²(1 − cos²i)), from k_v (kV) and
 * ν_v (normalV), into kRefV and kTrV.
 */
function splitDifferential(k: Float64Array, kV: Float64Array, nu: Float64Array, n1: number, n2: number, transmits: boolean): void {
  const cosI = -(k[0] * nu[0] + k[1] * nu[1] + k[2] * nu[2]);
  const cosIV = -(kV[0] * nu[0] + kV[1] * nu[1] + kV[2] * nu[2] + k[0] * normalV[0] + k[1] * normalV[1] + k[2] * normalV[2]);
  for (let c = 0; c < 3; c++) kRefV[c] = kV[c] + 2 * (cosIV * nu[c] + cosI * normalV[c]);
  if (!transmits) return;
  const ratio = n1 / n2;
  const cosT = fresnel.cosRefraction;
  const cosTV = (ratio * ratio * cosI * cosIV) / cosT;
  const along = ratio * cosI - cosT;
  const alongV = ratio * cosIV - cosTV;
  for (let c = 0; c < 3; c++) kTrV[c] = ratio * kV[c] + alongV * nu[c] + along * normalV[c];
}

function storeOrder(out: TraceOutput, p: number, k: Float64Array, at: Float64Array, path: number, f: Float64Array, kV: Float64Array | null): void {
  const o = p * ORDER_STRIDE;
  const rec = out.orders;
  rec[o + AT.valid] = 1;
  for (let c = 0; c < 3; c++) {
    rec[o + AT.dirV + c] = kV === null ? 0 : kV[c];
    rec[o + AT.pointV + c] = kV === null ? 0 : pointV[c];
    rec[o + AT.dir + c] = k[c];
    rec[o + AT.point + c] = at[c];
    rec[o + AT.e1Re + c] = f[c];
    rec[o + AT.e1Im + c] = f[3 + c];
    rec[o + AT.e2Re + c] = f[6 + c];
    rec[o + AT.e2Im + c] = f[9 + c];
  }
  // Far-field optical path in the ray's own direction: W = path so far − k_out·P_exit (van de Hulst 1957 §12.32 for
  // the sphere, where it reduces to 2(p·n·cos r − cos i)).
  rec[o + AT.path] = path - (k[0] * at[0] + k[1] * at[1] + k[2] * at[2]);
}

/**
 * Traces the ray o + t·d (|d| = 1, o outside the drop) with unit incident fields e1, e2 (real, ⟂ d) through the
 * drop, filling `out` with every order up to setup.maxOrder. With originV (do/dv of a family of parallel rays o(v) + t·d)
 * each order's d(dir)/dv and d(point)/dv are stored too (AT.dirV, AT.pointV; 0 without it).
 */
export function traceDrop(
  setup: DropTraceSetup,
  o: ArrayLike<number>,
  d: ArrayLike<number>,
  e1: ArrayLike<number>,
  e2: ArrayLike<number>,
  out: TraceOutput,
  originV: ArrayLike<number> | null = null,
): TraceOutput {
  const differential = originV !== null;
  out.orders.fill(0);
  out.absorbed.fill(0);
  out.remaining.fill(0);
  out.hit = false;
  const bound = setup.outline.maxRadius * (1 + 1e-9);
  for (let c = 0; c < 3; c++) {
    origin[c] = o[c];
    dir[c] = d[c];
  }
  const tIn = boundingExit(origin[0], origin[1], origin[2], dir[0], dir[1], dir[2], bound, true);
  if (Number.isNaN(tIn)) return out;
  const tFar = boundingExit(origin[0], origin[1], origin[2], dir[0], dir[1], dir[2], bound, false);
  // The closest approach to the centre is inside a convex drop whenever the line meets it near its middle: one
  // crossing between there and the bounding sphere. Otherwise scan for the first one.
  const tMid = Math.min(tFar, Math.max(tIn, -(origin[0] * dir[0] + origin[1] * dir[1] + origin[2] * dir[2])));
  const fMid = surface(setup, origin[0] + tMid * dir[0], origin[1] + tMid * dir[1], origin[2] + tMid * dir[2]);
  const t = fMid < 0 ? polish(setup, origin, dir, tIn, tMid, 1, sphereGuess(setup, origin, dir, tIn, true)) : crossing(setup, origin, dir, tIn, tFar, 1);
  if (Number.isNaN(t)) return out;
  out.hit = true;
  for (let c = 0; c < 3; c++) point[c] = origin[c] + t * dir[c];
  surfaceGradient(setup, point[0], point[1], point[2]);
  if (differential) {
    for (let c = 0; c < 3; c++) {
      pointV[c] = originV[c];
      dirV[c] = 0;
    }
    transferDifferential(t);
  }
  for (let c = 0; c < 3; c++) {
    normal[c] = grad[c];
    field[c] = e1[c];
    field[3 + c] = 0;
    field[6 + c] = e2[c];
    field[9 + c] = 0;
  }
  // Optical path from the plane through the drop's centre normal to d: d·P_entry (may be negative).
  let path = dir[0] * point[0] + dir[1] * point[1] + dir[2] * point[2];
  const n = setup.n;
  const entered = split(dir, normal, 1, n);
  if (differential) {
    normalDifferential(setup, 1);
    splitDifferential(dir, dirV, normal, 1, n, entered);
    dirV.set(kTrV);
  }
  storeOrder(out, 0, kRef, point, path, reflected, differential ? kRefV : null);
  field.set(transmitted);
  for (let c = 0; c < 3; c++) dir[c] = kTr[c];
  for (let p = 1; p <= setup.maxOrder; p++) {
    // Next wall from inside: F goes from negative to positive.
    const tExit = boundingExit(point[0], point[1], point[2], dir[0], dir[1], dir[2], bound, false);
    // A convex outline (the tabulated shapes up to 5.5 mm, 6 mm within a flat ring: test/lib/drops/shape.test.ts) is left exactly once.
    const tHit = polish(setup, point, dir, START_INSIDE, tExit, -1, sphereGuess(setup, point, dir, tExit, false));
    if (!(tHit > START_INSIDE)) break;
    for (let c = 0; c < 3; c++) point[c] += tHit * dir[c];
    path += n * tHit;
    // Beer–Lambert along the chord, for the field: exp(−αL/2).
    const keep = Math.exp(-0.5 * setup.absorptionPerRadius * tHit);
    for (let q = 0; q < 2; q++) {
      const before = power(field, q);
      for (let c = 0; c < 6; c++) field[6 * q + c] *= keep;
      out.absorbed[q] += before - power(field, q);
    }
    surfaceGradient(setup, point[0], point[1], point[2]);
    if (differential) transferDifferential(tHit);
    // ν facing the incident (inner) side is −∇F.
    for (let c = 0; c < 3; c++) normal[c] = -grad[c];
    const leaves = split(dir, normal, n, 1);
    if (differential) {
      normalDifferential(setup, -1);
      splitDifferential(dir, dirV, normal, n, 1, leaves);
      dirV.set(kRefV);
    }
    if (leaves) storeOrder(out, p, kTr, point, path, transmitted, differential ? kTrV : null);
    field.set(reflected);
    for (let c = 0; c < 3; c++) dir[c] = kRef[c];
  }
  out.remaining[0] = power(field, 0);
  out.remaining[1] = power(field, 1);
  return out;
}
