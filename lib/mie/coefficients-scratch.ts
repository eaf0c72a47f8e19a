// mieCoefficients (lib/mie/coefficients.ts) for the per-drop loop of profiles: the same recurrences and the same
// operations in the same order, so the same a_n, b_n to the bit, but into buffers reused from call to call. Allocating
// eight arrays per drop cost ~15 % of a profile's Mie time in garbage collection (measured, 65 drops × 800 angles).

import { mieTermCount } from "./termCount.js";
import { logDerivativeStart } from "./riccatiBessel.js";
import { assertSphereInput, type MieCoefficients } from "./types.js";

let capacity = 0;
let psi = new Float64Array(0);
let chi = new Float64Array(0);
let dRe = new Float64Array(0);
let dIm = new Float64Array(0);
let view: MieCoefficients = { nTerms: 0, aRe: psi, aIm: psi, bRe: psi, bIm: psi };

function reserve(n: number): void {
  if (n + 1 <= capacity) return;
  capacity = Math.max(n + 1, Math.ceil(1.5 * capacity));
  psi = new Float64Array(capacity);
  chi = new Float64Array(capacity);
  dRe = new Float64Array(capacity);
  dIm = new Float64Array(capacity);
  view = {
    nTerms: 0,
    aRe: new Float64Array(capacity),
    aIm: new Float64Array(capacity),
    bRe: new Float64Array(capacity),
    bIm: new Float64Array(capacity),
  };
}

/**
 * a_n, b_n of a homogeneous sphere as mieCoefficients gives them (Bohren & Huffman 1983 eqs. 4.88, 4.89; Wiscombe
 * 1980). The result is valid until the next call: its arrays are reused and may be longer than nTerms.
 */
export function mieCoefficientsScratch(mRe: number, mIm: number, x: number): MieCoefficients {
  assertSphereInput(mRe, mIm, x);
  const n = mieTermCount(x);
  reserve(n);
  // ψ_n, χ_n upward from sin x, cos x (as riccatiBesselReal).
  const s = Math.sin(x);
  const c = Math.cos(x);
  psi[0] = s;
  chi[0] = c;
  if (n >= 1) {
    psi[1] = s / x - c;
    chi[1] = c / x + s;
  }
  for (let k = 2; k <= n; k++) {
    const f = (2 * k - 1) / x;
    psi[k] = f * psi[k - 1] - psi[k - 2];
    chi[k] = f * chi[k - 1] - chi[k - 2];
  }
  // D_n(mx) downward, D_{n−1} = n/z − 1/(D_n + n/z) (as logDerivativeDown).
  const zRe = mRe * x;
  const zIm = mIm * x;
  const zAbs2 = zRe * zRe + zIm * zIm;
  const izRe = zRe / zAbs2;
  const izIm = -zIm / zAbs2;
  let re = 0;
  let im = 0;
  for (let k = Math.max(logDerivativeStart(n, Math.hypot(zRe, zIm)), n + 1); k >= 1; k--) {
    const nzRe = k * izRe;
    const nzIm = k * izIm;
    const sRe = re + nzRe;
    const sIm = im + nzIm;
    const s2 = sRe * sRe + sIm * sIm;
    re = nzRe - sRe / s2;
    im = nzIm + sIm / s2;
    if (k - 1 <= n) {
      dRe[k - 1] = re;
      dIm[k - 1] = im;
    }
  }
  const m2 = mRe * mRe + mIm * mIm;
  const imRe = mRe / m2;
  const imIm = -mIm / m2;
  const { aRe, aIm, bRe, bIm } = view;
  for (let k = 1; k <= n; k++) {
    const nx = k / x;
    const ps = psi[k];
    const ps1 = psi[k - 1];
    const xiIm = -chi[k];
    const xi1Im = -chi[k - 1];
    // a_n with D/m + n/x, b_n with m·D + n/x (B&H eq. 4.88), as setRatio in coefficients.ts.
    let fRe = dRe[k] * imRe - dIm[k] * imIm + nx;
    let fIm = dRe[k] * imIm + dIm[k] * imRe;
    let numRe = fRe * ps - ps1;
    let numIm = fIm * ps;
    let denRe = fRe * ps - fIm * xiIm - ps1;
    let denIm = fRe * xiIm + fIm * ps - xi1Im;
    let d2 = denRe * denRe + denIm * denIm;
    aRe[k - 1] = (numRe * denRe + numIm * denIm) / d2;
    aIm[k - 1] = (numIm * denRe - numRe * denIm) / d2;
    fRe = dRe[k] * mRe - dIm[k] * mIm + nx;
    fIm = dRe[k] * mIm + dIm[k] * mRe;
    numRe = fRe * ps - ps1;
    numIm = fIm * ps;
    denRe = fRe * ps - fIm * xiIm - ps1;
    denIm = fRe * xiIm + fIm * ps - xi1Im;
    d2 = denRe * denRe + denIm * denIm;
    bRe[k - 1] = (numRe * denRe + numIm * denIm) / d2;
    bIm[k - 1] = (numIm * denRe - numRe * denIm) / d2;
  }
  view.nTerms = n;
  return view;
}
