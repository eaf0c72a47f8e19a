import type { MieCoefficients, MieEfficiencies } from "./types.js";

/**
 * Efficiencies from the partial-wave coefficients (Bohren & Huffman 1983):
 * Qsca = 2/x² Σ(2n+1)(|a_n|²+|b_n|²) (eq. 4.61), Qext = 2/x² Σ(2n+1)Re(a_n+b_n) (eq. 4.62),
 * g·Qsca = 4/x² [Σ n(n+2)/(n+1) Re(a_n a*_{n+1} + b_n b*_{n+1}) + Σ (2n+1)/(n(n+1)) Re(a_n b*_n)]
 * (B&H §4.5, asymmetry parameter; equation number from memory), Qback = 4|S1(180°)|²/x² with
 * S1(180°) = Σ (2n+1)/2 (−1)^(n−1) (a_n − b_n) (from B&H eq. 4.74 with π_n(−1) = (−1)^(n−1) n(n+1)/2,
 * τ_n(−1) = −π_n(−1)).
 */
export function mieEfficiencies(c: MieCoefficients, x: number): MieEfficiencies {
  const { nTerms, aRe, aIm, bRe, bIm } = c;
  let ext = 0;
  let sca = 0;
  let gSum = 0;
  let backRe = 0;
  let backIm = 0;
  let sign = 1;
  for (let i = 0; i < nTerms; i++) {
    const n = i + 1;
    const w = 2 * n + 1;
    ext += w * (aRe[i] + bRe[i]);
    sca += w * (aRe[i] * aRe[i] + aIm[i] * aIm[i] + bRe[i] * bRe[i] + bIm[i] * bIm[i]);
    gSum += (w / (n * (n + 1))) * (aRe[i] * bRe[i] + aIm[i] * bIm[i]);
    if (i + 1 < nTerms) {
      gSum +=
        ((n * (n + 2)) / (n + 1)) *
        (aRe[i] * aRe[i + 1] + aIm[i] * aIm[i + 1] + bRe[i] * bRe[i + 1] + bIm[i] * bIm[i + 1]);
    }
    backRe += sign * 0.5 * w * (aRe[i] - bRe[i]);
    backIm += sign * 0.5 * w * (aIm[i] - bIm[i]);
    sign = -sign;
  }
  const x2 = x * x;
  const qSca = (2 / x2) * sca;
  return {
    qExt: (2 / x2) * ext,
    qSca,
    qBack: (4 / x2) * (backRe * backRe + backIm * backIm),
    g: (4 / x2) * gSum / qSca,
  };
}
