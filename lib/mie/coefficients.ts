import { mieTermCount } from "./termCount.js";
import { riccatiBesselReal, riccatiBesselAndLogDerivative, logDerivativeStart } from "./riccatiBessel.js";
import { allocateCoefficients, assertSphereInput, type MieCoefficients } from "./types.js";
import { simdCoefficients } from "./simd-coefficients.js";

/**
 * Lorenz–Mie coefficients a_n, b_n of a homogeneous sphere, m = mRe + i·mIm (mIm ≥ 0, Bohren &
 * Huffman 1983 convention), size parameter x = 2πr/λ.
 * a_n = [(D_n/m + n/x)ψ_n − ψ_{n−1}] / [(D_n/m + n/x)ξ_n − ξ_{n−1}], b_n likewise with m·D_n
 * (Bohren & Huffman 1983 eq. 4.88), ξ_n = ψ_n − iχ_n.
 */
export function mieCoefficients(mRe: number, mIm: number, x: number, nTerms?: number, workspace?: MieWorkspace): MieCoefficients {
  assertSphereInput(mRe, mIm, x);
  const n = nTerms ?? mieTermCount(x);
  if (workspace) reserve(workspace, n);
  const out = workspace ? workspace.coefficients : allocateCoefficients(n);
  // The WebAssembly SIMD ratios give the same bits as the loop below, two orders at a time (lib/mie/simd-coefficients.ts).
  if (!simdCoefficients(mRe, mIm, x, n, out)) scalarRatios(mRe, mIm, x, n, out, workspace);
  out.nTerms = n;
  return out;
}

/**
 * As mieCoefficients, always by the TypeScript loop (the fallback where WebAssembly SIMD is missing): the reference
 * the WebAssembly ratios are checked against.
 */
export function mieCoefficientsScalar(mRe: number, mIm: number, x: number, nTerms?: number, workspace?: MieWorkspace): MieCoefficients {
  assertSphereInput(mRe, mIm, x);
  const n = nTerms ?? mieTermCount(x);
  if (workspace) reserve(workspace, n);
  const out = workspace ? workspace.coefficients : allocateCoefficients(n);
  scalarRatios(mRe, mIm, x, n, out, workspace);
  out.nTerms = n;
  return out;
}

function scalarRatios(mRe: number, mIm: number, x: number, n: number, out: MieCoefficients, workspace?: MieWorkspace): void {
  if (workspace) reserveRecurrences(workspace, n);
  const zRe = mRe * x;
  const zIm = mIm * x;
  const { psi, chi, dRe, dIm } = riccatiBesselAndLogDerivative(x, zRe, zIm, n, logDerivativeStart(n, Math.hypot(zRe, zIm)), workspace);
  const m2 = mRe * mRe + mIm * mIm;
  // 1/m
  const imRe = mRe / m2;
  const imIm = -mIm / m2;
  for (let k = 1; k <= n; k++) {
    const nx = k / x;
    const ps = psi[k];
    const ps1 = psi[k - 1];
    const xiRe = ps;
    const xiIm = -chi[k];
    const xi1Re = ps1;
    const xi1Im = -chi[k - 1];
    // a_n: da = D/m + n/x
    let fRe = dRe[k] * imRe - dIm[k] * imIm + nx;
    let fIm = dRe[k] * imIm + dIm[k] * imRe;
    setRatio(out.aRe, out.aIm, k - 1, fRe, fIm, ps, ps1, xiRe, xiIm, xi1Re, xi1Im);
    // b_n: db = m·D + n/x
    fRe = dRe[k] * mRe - dIm[k] * mIm + nx;
    fIm = dRe[k] * mIm + dIm[k] * mRe;
    setRatio(out.bRe, out.bIm, k - 1, fRe, fIm, ps, ps1, xiRe, xiIm, xi1Re, xi1Im);
  }
}

/**
 * Buffers reused from one mieCoefficients call to the next: allocating eight arrays per drop cost ~15 % of a
 * profile's Mie time in garbage collection (measured, 65 drops × 800 angles). A result computed into a workspace
 * is valid until its next use; its arrays may be longer than nTerms.
 */
export interface MieWorkspace {
  psi: Float64Array;
  chi: Float64Array;
  dRe: Float64Array;
  dIm: Float64Array;
  coefficients: MieCoefficients;
}

export function createMieWorkspace(): MieWorkspace {
  return { psi: new Float64Array(0), chi: new Float64Array(0), dRe: new Float64Array(0), dIm: new Float64Array(0), coefficients: allocateCoefficients(0) };
}

/** Room for n coefficients (the WebAssembly path keeps ψ, χ, D in its own memory: lib/mie/simd-coefficients.ts). */
function reserve(w: MieWorkspace, n: number): void {
  if (n <= w.coefficients.aRe.length) return;
  w.coefficients = allocateCoefficients(Math.max(n, Math.ceil(1.5 * w.coefficients.aRe.length)));
}

/** Room for ψ, χ, D of orders 0..n, for the TypeScript loop only. */
function reserveRecurrences(w: MieWorkspace, n: number): void {
  if (n + 1 <= w.psi.length) return;
  const capacity = Math.max(n + 1, Math.ceil(1.5 * w.psi.length));
  w.psi = new Float64Array(capacity);
  w.chi = new Float64Array(capacity);
  w.dRe = new Float64Array(capacity);
  w.dIm = new Float64Array(capacity);
}

/** c = (f·ψ_n − ψ_{n−1}) / (f·ξ_n − ξ_{n−1}) for complex f, ξ and real ψ. */
function setRatio(
  outRe: Float64Array,
  outIm: Float64Array,
  i: number,
  fRe: number,
  fIm: number,
  ps: number,
  ps1: number,
  xiRe: number,
  xiIm: number,
  xi1Re: number,
  xi1Im: number,
): void {
  const numRe = fRe * ps - ps1;
  const numIm = fIm * ps;
  const denRe = fRe * xiRe - fIm * xiIm - xi1Re;
  const denIm = fRe * xiIm + fIm * xiRe - xi1Im;
  const d2 = denRe * denRe + denIm * denIm;
  outRe[i] = (numRe * denRe + numIm * denIm) / d2;
  outIm[i] = (numIm * denRe - numRe * denIm) / d2;
}

/**
 * Perfectly conducting sphere, the |m| → ∞ limit: a_n = ψ_n'(x)/ξ_n'(x), b_n = ψ_n(x)/ξ_n(x)
 * (Bohren & Huffman 1983 eq. 4.53 in the limit; Wiscombe 1980, Appl. Opt. 19, 1505), with
 * f_n' = f_{n−1} − (n/x) f_n for the Riccati functions (from the spherical Bessel recurrences, B&H §4.1).
 */
export function mieCoefficientsPerfectConductor(x: number, nTerms?: number): MieCoefficients {
  assertSphereInput(1, 0, x);
  const n = nTerms ?? mieTermCount(x);
  const out = allocateCoefficients(n);
  const { psi, chi } = riccatiBesselReal(x, n);
  for (let k = 1; k <= n; k++) {
    const nx = k / x;
    // b_n = ψ / (ψ − iχ)
    let pRe = psi[k];
    let xRe = psi[k];
    let xIm = -chi[k];
    let d2 = xRe * xRe + xIm * xIm;
    out.bRe[k - 1] = (pRe * xRe) / d2;
    out.bIm[k - 1] = (-pRe * xIm) / d2;
    // a_n = ψ' / ξ'
    pRe = psi[k - 1] - nx * psi[k];
    xRe = pRe;
    xIm = -(chi[k - 1] - nx * chi[k]);
    d2 = xRe * xRe + xIm * xIm;
    out.aRe[k - 1] = (pRe * xRe) / d2;
    out.aIm[k - 1] = (-pRe * xIm) / d2;
  }
  return out;
}
