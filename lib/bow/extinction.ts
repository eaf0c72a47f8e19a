// How much of the background a curtain of drops lets through: T = exp(−τ), τ = s · Σ_i w_i Q_ext(r_i) π r_i²
// (Beer–Lambert law; Bohren & Huffman 1983 §3.4 for the extinction cross-section C_ext = Q_ext π r²).

import { mieCoefficients } from "../mie/coefficients.js";
import { mieEfficiencies } from "../mie/efficiencies.js";

/**
 * Above this size parameter Q_ext is taken as 2, the large-sphere limit (van de Hulst 1957 §8.22, the
 * extinction paradox); Q_ext − 2 is ~0.5 % at x = 2000 for water (test/lib/bow/extinction.test.ts measures it).
 */
export const EXTINCTION_LIMIT_X = 2000;

/** Q_ext of one water drop at one wavelength. */
export function extinctionEfficiency(mRe: number, mIm: number, x: number): number {
  if (x > EXTINCTION_LIMIT_X) return 2;
  return mieEfficiencies(mieCoefficients(mRe, mIm, x), x).qExt;
}

/** Optical thickness of a path through the drops (nodes in µm, weights in m⁻³, path in m). */
export function opticalThickness(
  radiiUm: Float64Array,
  weightsPerM3: Float64Array,
  medium: { wavelengthNm: number; mRe: number; mIm: number; nAir: number },
  pathLengthM: number,
): number {
  const k = (2 * Math.PI * medium.nAir) / (medium.wavelengthNm * 1e-3);
  let tau = 0;
  for (let i = 0; i < radiiUm.length; i++) {
    const r = radiiUm[i];
    const q = extinctionEfficiency(medium.mRe, medium.mIm, k * r);
    tau += weightsPerM3[i] * q * Math.PI * (r * 1e-6) ** 2;
  }
  return tau * pathLengthM;
}
