import { allocateAmplitudes, type MieAmplitudes, type MieCoefficients } from "./types.js";
import { mieAmplitudesSimd } from "./simd-amplitudes.js";
import { packCoefficients, PACKED_STRIDE } from "./packed-coefficients.js";

let packed = new Float64Array(0);

function packedStream(c: MieCoefficients): Float64Array {
  const need = c.nTerms * PACKED_STRIDE;
  if (packed.length < need) packed = new Float64Array(need);
  packCoefficients(c, packed);
  return packed;
}

function checkedOutput(nAngles: number, out?: MieAmplitudes): MieAmplitudes {
  const res = out ?? allocateAmplitudes(nAngles);
  if (res.s1Re.length < nAngles || res.s1Im.length < nAngles || res.s2Re.length < nAngles || res.s2Im.length < nAngles) {
    throw new RangeError(`output arrays shorter than the ${nAngles} angles`);
  }
  return res;
}

/**
 * S1, S2 at each μ = cos Θ as mieAmplitudesScalar computes them, by the WebAssembly SIMD kernel
 * (lib/mie/simd-amplitudes.ts; same operations in the same order, so the same sums) where available.
 */
export function mieAmplitudes(c: MieCoefficients, cosTheta: Float64Array, out?: MieAmplitudes): MieAmplitudes {
  const res = checkedOutput(cosTheta.length, out);
  return mieAmplitudesSimd(c, cosTheta, res) ?? mieAmplitudesScalar(c, cosTheta, res);
}

/**
 * Scattering amplitudes S1 = Σ w_n (a_n π_n + b_n τ_n), S2 = Σ w_n (a_n τ_n + b_n π_n),
 * w_n = (2n+1)/(n(n+1)) (Bohren & Huffman 1983 eq. 4.74), at each μ = cos Θ, summed as
 * S1 + S2 = Σ w(a+b)(π+τ) and S1 − S2 = Σ w(a−b)(π−τ), which needs 4 products per term instead of 8.
 * π_n, τ_n (B&H eq. 4.47) in Wiscombe's arrangement (1980, Appl. Opt. 19, 1505; MIEV0):
 * s = μπ_n, t = s − π_{n−1}, τ_n = n·t − π_{n−1}, π_{n+1} = s + (n+1)/n·t. Near μ = ±1 it keeps
 * |S|² to ~1e-11 at x = 50000 where the textbook form loses 3e-9.
 * Angles go two at a time: two independent recurrences overlap in the pipeline (~20 % faster than
 * one; four at a time or the n-outer order measured no faster). Not exploited: the Θ ↔ 180° − Θ
 * symmetry π_n(−μ) = (−1)^(n−1)π_n(μ), τ_n(−μ) = (−1)^n τ_n(μ) (B&H eq. 4.47 recurrences); it would
 * share only the π recurrence while the accumulations double, and bow work needs one half only.
 * This is the reference: mieAmplitudes runs the same loop on WebAssembly SIMD lanes where it can.
 */
export function mieAmplitudesScalar(
  c: MieCoefficients,
  cosTheta: Float64Array,
  out?: MieAmplitudes,
): MieAmplitudes {
  const res = checkedOutput(cosTheta.length, out);
  const nAngles = cosTheta.length;
  const p = packedStream(c);
  const end = c.nTerms * PACKED_STRIDE;
  const { s1Re, s1Im, s2Re, s2Im } = res;
  let j = 0;
  for (; j + 1 < nAngles; j += 2) {
    const mu = cosTheta[j];
    const nu = cosTheta[j + 1];
    let pPrev = 0;
    let pCur = 1;
    let qPrev = 0;
    let qCur = 1;
    // sums of S1 + S2 (plus) and S1 − S2 (minus) at the two angles
    let pPlusRe = 0, pPlusIm = 0, pMinusRe = 0, pMinusIm = 0;
    let qPlusRe = 0, qPlusIm = 0, qMinusRe = 0, qMinusIm = 0;
    let n = 1;
    for (let k = 0; k < end; k += PACKED_STRIDE) {
      const sumRe = p[k], sumIm = p[k + 1], difRe = p[k + 2], difIm = p[k + 3], f = p[k + 4];
      const s = mu * pCur;
      const t = s - pPrev;
      const tauP = n * t - pPrev;
      const u = nu * qCur;
      const v = u - qPrev;
      const tauQ = n * v - qPrev;
      const pp = pCur + tauP;
      const pm = pCur - tauP;
      const qp = qCur + tauQ;
      const qm = qCur - tauQ;
      pPlusRe += sumRe * pp;
      pPlusIm += sumIm * pp;
      pMinusRe += difRe * pm;
      pMinusIm += difIm * pm;
      qPlusRe += sumRe * qp;
      qPlusIm += sumIm * qp;
      qMinusRe += difRe * qm;
      qMinusIm += difIm * qm;
      pPrev = pCur;
      pCur = s + f * t;
      qPrev = qCur;
      qCur = u + f * v;
      n++;
    }
    s1Re[j] = 0.5 * (pPlusRe + pMinusRe);
    s1Im[j] = 0.5 * (pPlusIm + pMinusIm);
    s2Re[j] = 0.5 * (pPlusRe - pMinusRe);
    s2Im[j] = 0.5 * (pPlusIm - pMinusIm);
    s1Re[j + 1] = 0.5 * (qPlusRe + qMinusRe);
    s1Im[j + 1] = 0.5 * (qPlusIm + qMinusIm);
    s2Re[j + 1] = 0.5 * (qPlusRe - qMinusRe);
    s2Im[j + 1] = 0.5 * (qPlusIm - qMinusIm);
  }
  if (j < nAngles) {
    const mu = cosTheta[j];
    let pPrev = 0;
    let pCur = 1;
    let plusRe = 0, plusIm = 0, minusRe = 0, minusIm = 0;
    let n = 1;
    for (let k = 0; k < end; k += PACKED_STRIDE) {
      const s = mu * pCur;
      const t = s - pPrev;
      const tau = n * t - pPrev;
      plusRe += p[k] * (pCur + tau);
      plusIm += p[k + 1] * (pCur + tau);
      minusRe += p[k + 2] * (pCur - tau);
      minusIm += p[k + 3] * (pCur - tau);
      pPrev = pCur;
      pCur = s + p[k + 4] * t;
      n++;
    }
    s1Re[j] = 0.5 * (plusRe + minusRe);
    s1Im[j] = 0.5 * (plusIm + minusIm);
    s2Re[j] = 0.5 * (plusRe - minusRe);
    s2Im[j] = 0.5 * (plusIm - minusIm);
  }
  return res;
}
