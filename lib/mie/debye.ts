import { mieTermCount } from "./termCount.js";
import { riccatiBesselAndLogDerivative, logDerivativeStart } from "./riccatiBessel.js";
import { allocateCoefficients, assertSphereInput, type MieCoefficients } from "./types.js";

/**
 * Debye series of the Lorenz–Mie coefficients (van de Hulst 1957; Hovenac & Lock 1992, J. Opt. Soc.
 * Am. A 9, 781): for each partial wave n and each mode (TM → a_n, TE → b_n)
 *   a_n = ½ [1 − R22 − Σ_{p≥1} T21 (R11)^(p−1) T12],
 * R22 external reflection, R11 internal reflection, T21 T12 the in-and-out transmission product of the
 * spherical surface, all from Riccati–Hankel functions ξ1 = ψ − iχ (outgoing, e^{−iωt}) and
 * ξ2 = ψ + iχ (incoming) of x and z = m x.
 * Attribution of the diffraction half: order p = 0 carries ½(1 − R22), i.e. diffraction plus external
 * reflection, as in Hovenac & Lock 1992; orders p ≥ 1 carry −½ T21 (R11)^(p−1) T12. Phases follow the
 * e^{−iωt} convention of Bohren & Huffman; papers using e^{+iωt} have the complex conjugates.
 *
 * With L = ξ'/ξ the logarithmic derivatives, κ = 1/m for a_n and κ = m for b_n (boundary condition
 * u'/u outside = κ × inside, from Bohren & Huffman 1983 eq. 4.53) and the Wronskian
 * ξ1 ξ2' − ξ1' ξ2 = −2i (from ψχ' − ψ'χ = −1 for the Riccati–Bessel functions), matching one surface at
 * a time gives
 *   R22 = −(ξ2(x)/ξ1(x)) (L2(x) − κL2(z)) / (L1(x) − κL2(z))
 *   R11 = −(ξ1(z)/ξ2(z)) (κL1(z) − L1(x)) / (κL2(z) − L1(x))
 *   T21 T12 = −4κ / [ξ1(x) ξ2(z) (L1(x) − κL2(z))]²
 * (derived by matching the fields at the single surface; same content as Hovenac & Lock 1992 §2,
 * equation numbers not checked. Checked in test/lib/mie/debye.test.ts: the sum over p reproduces B&H
 * eq. 4.53 to ≤ 2e-12, and a lossless surface conserves flux.)
 */
export interface DebyeModeCoefficients {
  r22Re: Float64Array;
  r22Im: Float64Array;
  r11Re: Float64Array;
  r11Im: Float64Array;
  /** T21·T12 */
  tRe: Float64Array;
  tIm: Float64Array;
  /** 1 − R11, computed without cancellation (see debyeSurfaceCoefficients) */
  oneMinusR11Re: Float64Array;
  oneMinusR11Im: Float64Array;
}

export interface DebyeSurfaceCoefficients {
  nTerms: number;
  /** TM mode, builds a_n */
  a: DebyeModeCoefficients;
  /** TE mode, builds b_n */
  b: DebyeModeCoefficients;
}

function allocateMode(n: number): DebyeModeCoefficients {
  return {
    r22Re: new Float64Array(n),
    r22Im: new Float64Array(n),
    r11Re: new Float64Array(n),
    r11Im: new Float64Array(n),
    tRe: new Float64Array(n),
    tIm: new Float64Array(n),
    oneMinusR11Re: new Float64Array(n),
    oneMinusR11Im: new Float64Array(n),
  };
}

type Cx = [number, number];
const add = (a: Cx, b: Cx): Cx => [a[0] + b[0], a[1] + b[1]];
const sub = (a: Cx, b: Cx): Cx => [a[0] - b[0], a[1] - b[1]];
const mul = (a: Cx, b: Cx): Cx => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const scale = (a: Cx, s: number): Cx => [a[0] * s, a[1] * s];
function div(a: Cx, b: Cx): Cx {
  // Smith's algorithm avoids overflow in |b|² (Smith 1962, Commun. ACM 5, 435)
  if (Math.abs(b[0]) >= Math.abs(b[1])) {
    const r = b[1] / b[0];
    const d = b[0] + b[1] * r;
    return [(a[0] + a[1] * r) / d, (a[1] - a[0] * r) / d];
  }
  const r = b[0] / b[1];
  const d = b[0] * r + b[1];
  return [(a[0] * r + a[1]) / d, (a[1] * r - a[0]) / d];
}

/**
 * Surface reflection and transmission coefficients for every partial wave n = 1..nTerms.
 * Stability: L1(z) by upward recurrence L_n = 1/(n/z − L_{n−1}) − n/z from L_0 = i (ξ1 dominates
 * upward for Im z ≥ 0); D_n(z) = ψ'/ψ by downward recurrence (B&H eq. 4.89);
 * H_n = ξ1_n(z)/ψ_n(z) = H_{n−1} (D_n + n/z)/(L1_n + n/z), carried as mantissa·e^exponent so that the
 * e^{−2 Im z} of strongly absorbing spheres cannot underflow before the edge waves recover it; then
 * ξ1/ξ2 = H/(2 − H) and L2 = (2D − L1 H)/(2 − H) follow from ξ2 = 2ψ − ξ1, avoiding the upward
 * recurrence of L2, which is unstable for absorbing spheres.
 * 1 − R11 = (1 + ξ1(z)/ξ2(z)) (κD(z) − L1(x)) / (κL2(z) − L1(x)) (same algebra, using ξ1 + ξ2 = 2ψ)
 * keeps the remainder finite where R11 rounds to 1 (partial waves beyond the edge when m < 1).
 */
export function debyeSurfaceCoefficients(
  mRe: number,
  mIm: number,
  x: number,
  nTerms?: number,
): DebyeSurfaceCoefficients {
  assertSphereInput(mRe, mIm, x);
  const N = nTerms ?? mieTermCount(x);
  const out: DebyeSurfaceCoefficients = { nTerms: N, a: allocateMode(N), b: allocateMode(N) };
  const z: Cx = [mRe * x, mIm * x];
  const { psi, chi, dRe, dIm } = riccatiBesselAndLogDerivative(x, z[0], z[1], N, logDerivativeStart(N, Math.hypot(z[0], z[1])));
  const invZ = div([1, 0], z);
  const m: Cx = [mRe, mIm];
  const kappaA = div([1, 0], m);

  // ξ1_0(z) = −i e^{iz}, ψ_0(z) = sin z, so H_0 = 2E/(E − 1) with E = e^{2iz} (ψ_0 = sin z, χ_0 = cos z).
  const e2 = Math.exp(-2 * z[1]);
  const E: Cx = [e2 * Math.cos(2 * z[0]), e2 * Math.sin(2 * z[0])];
  let hMant: Cx = div([2 * Math.cos(2 * z[0]), 2 * Math.sin(2 * z[0])], sub(E, [1, 0]));
  let hExp = -2 * z[1];
  let l1z: Cx = [0, 1];
  let invP: Cx = [1, 0]; // 1/(ξ1_0 ξ2_0) = 1

  for (let n = 1; n <= N; n++) {
    const nz = scale(invZ, n);
    l1z = sub(div([1, 0], sub(nz, l1z)), nz);
    const dn: Cx = [dRe[n], dIm[n]];
    hMant = mul(hMant, div(add(dn, nz), add(l1z, nz)));
    const hAbs = Math.hypot(hMant[0], hMant[1]);
    if (hAbs > 1e100 || hAbs < 1e-100) {
      hExp += Math.log(hAbs);
      hMant = scale(hMant, 1 / hAbs);
    }
    let q: Cx; // ξ1(z)/ξ2(z)
    let qPlus1: Cx;
    let l2z: Cx;
    if (hExp <= 0) {
      const h = scale(hMant, Math.exp(hExp));
      const den = sub([2, 0], h);
      q = div(h, den);
      qPlus1 = div([2, 0], den);
      l2z = div(sub(scale(dn, 2), mul(l1z, h)), den);
    } else {
      const g = scale(div([1, 0], hMant), Math.exp(-hExp)); // 1/H
      const den = sub(scale(g, 2), [1, 0]);
      q = div([1, 0], den);
      qPlus1 = div(scale(g, 2), den);
      l2z = div(sub(mul(scale(dn, 2), g), l1z), den);
    }
    invP = mul(invP, mul(add(l1z, nz), add(l2z, nz)));
    const invXi2zSq = mul(q, invP); // 1/ξ2(z)²

    // real argument: ξ1(x) = ψ − iχ, L1(x) = ξ1_{n−1}/ξ1_n − n/x, ξ2(x) = conj ξ1(x)
    const xi1x: Cx = [psi[n], -chi[n]];
    const l1x = sub(div([psi[n - 1], -chi[n - 1]], xi1x), [n / x, 0]);
    const l2x: Cx = [l1x[0], -l1x[1]];
    const ratioX = div([xi1x[0], -xi1x[1]], xi1x); // ξ2(x)/ξ1(x)

    for (const [mode, kappa] of [
      [out.a, kappaA],
      [out.b, m],
    ] as const) {
      const kl2z = mul(kappa, l2z);
      const extDen = sub(l1x, kl2z);
      const r22 = scale(mul(ratioX, div(sub(l2x, kl2z), extDen)), -1);
      const intDen = sub(kl2z, l1x);
      const r11 = scale(mul(q, div(sub(mul(kappa, l1z), l1x), intDen)), -1);
      const oneMinusR11 = mul(qPlus1, div(sub(mul(kappa, dn), l1x), intDen));
      const w = mul(xi1x, extDen);
      const t = mul(scale(div(kappa, mul(w, w)), -4), invXi2zSq);
      const i = n - 1;
      mode.r22Re[i] = r22[0];
      mode.r22Im[i] = r22[1];
      mode.r11Re[i] = r11[0];
      mode.r11Im[i] = r11[1];
      mode.tRe[i] = t[0];
      mode.tIm[i] = t[1];
      mode.oneMinusR11Re[i] = oneMinusR11[0];
      mode.oneMinusR11Im[i] = oneMinusR11[1];
    }
  }
  return out;
}

/** Coefficients (a_n, b_n) of Debye order p alone, from precomputed surface coefficients. */
export function debyeOrderFromSurface(s: DebyeSurfaceCoefficients, p: number): MieCoefficients {
  if (!Number.isInteger(p) || p < 0) throw new RangeError(`Debye order must be an integer ≥ 0, got ${p}`);
  const out = allocateCoefficients(s.nTerms);
  fillOrder(s.a, p, out.aRe, out.aIm, s.nTerms);
  fillOrder(s.b, p, out.bRe, out.bIm, s.nTerms);
  return out;
}

function fillOrder(c: DebyeModeCoefficients, p: number, re: Float64Array, im: Float64Array, N: number): void {
  for (let i = 0; i < N; i++) {
    if (p === 0) {
      re[i] = 0.5 * (1 - c.r22Re[i]);
      im[i] = -0.5 * c.r22Im[i];
      continue;
    }
    // −½ T21 T12 (R11)^(p−1)
    let vRe = -0.5 * c.tRe[i];
    let vIm = -0.5 * c.tIm[i];
    for (let k = 1; k < p; k++) {
      const t = vRe * c.r11Re[i] - vIm * c.r11Im[i];
      vIm = vRe * c.r11Im[i] + vIm * c.r11Re[i];
      vRe = t;
    }
    re[i] = vRe;
    im[i] = vIm;
  }
}

/**
 * All orders above pMax together: −½ T21 T12 (R11)^pMax / (1 − R11), the tail of the geometric series
 * in Hovenac & Lock 1992; Σ_{p=0..pMax} + remainder = Mie coefficients.
 */
export function debyeRemainderFromSurface(s: DebyeSurfaceCoefficients, pMax: number): MieCoefficients {
  if (!Number.isInteger(pMax) || pMax < 0) throw new RangeError(`pMax must be an integer ≥ 0, got ${pMax}`);
  const out = allocateCoefficients(s.nTerms);
  for (const [c, re, im] of [
    [s.a, out.aRe, out.aIm],
    [s.b, out.bRe, out.bIm],
  ] as const) {
    fillOrder(c, pMax + 1, re, im, s.nTerms);
    for (let i = 0; i < s.nTerms; i++) {
      const v = div([re[i], im[i]], [c.oneMinusR11Re[i], c.oneMinusR11Im[i]]);
      re[i] = v[0];
      im[i] = v[1];
    }
  }
  return out;
}

/** Debye order p (0 = diffraction + external reflection, 1 = transmission, 2 = primary bow, …). */
export function debyeCoefficients(mRe: number, mIm: number, x: number, p: number, nTerms?: number): MieCoefficients {
  return debyeOrderFromSurface(debyeSurfaceCoefficients(mRe, mIm, x, nTerms), p);
}

/** Sum of all Debye orders p > pMax. */
export function debyeRemainderCoefficients(
  mRe: number,
  mIm: number,
  x: number,
  pMax: number,
  nTerms?: number,
): MieCoefficients {
  return debyeRemainderFromSurface(debyeSurfaceCoefficients(mRe, mIm, x, nTerms), pMax);
}
