// How much of the background a curtain of drops lets through: T = exp(−τ), τ = s · Σ_i w_i Q_ext(r_i) π r_i²
// (Beer–Lambert law; Bohren & Huffman 1983 §3.4 for the extinction cross-section C_ext = Q_ext π r²).

import { mieCoefficients } from "../mie/coefficients.js";
import { mieEfficiencies } from "../mie/efficiencies.js";
import { dropMedium, type DropMedium, type DropWater } from "../water/drop-medium.js";

/**
 * Above this size parameter Q_ext is taken as 2, the large-sphere limit (van de Hulst 1957 §8.22, the
 * extinction paradox); Q_ext − 2 is ~0.5 % at x = 2000 for water (test/lib/bow/extinction.test.ts measures it).
 */
export const EXTINCTION_LIMIT_X = 2000;

/**
 * The one wavelength at which the rain curtain's transmittance is taken, for textures and views alike: the peak of
 * the photopic luminous efficiency V(λ) = ȳ(λ) of the CIE 1931 observer, 555 nm (CIE 018:2019 Table 6, ȳ = 1 there).
 * Rain's extinction is nearly grey (Q_ext ≈ 2), so one wavelength stands for the visible.
 */
export const CURTAIN_WAVELENGTH_NM = 555;

/** Q_ext of one water drop at one wavelength. */
export function extinctionEfficiency(mRe: number, mIm: number, x: number): number {
  if (x > EXTINCTION_LIMIT_X) return 2;
  return mieEfficiencies(mieCoefficients(mRe, mIm, x), x).qExt;
}

/** Q_ext of each drop (nodes in µm) in the medium. */
function extinctionEfficiencies(radiiUm: Float64Array, medium: DropMedium): Float64Array {
  const k = (2 * Math.PI * medium.nAir) / (medium.wavelengthNm * 1e-3);
  return radiiUm.map((r) => extinctionEfficiency(medium.mRe, medium.mIm, k * r));
}

function thicknessOf(radiiUm: Float64Array, weightsPerM3: Float64Array, qExt: Float64Array, pathLengthM: number): number {
  let tau = 0;
  for (let i = 0; i < radiiUm.length; i++) tau += weightsPerM3[i] * qExt[i] * Math.PI * (radiiUm[i] * 1e-6) ** 2;
  return tau * pathLengthM;
}

/** Optical thickness of a path through the drops (nodes in µm, weights in m⁻³, path in m). */
export function opticalThickness(radiiUm: Float64Array, weightsPerM3: Float64Array, medium: DropMedium, pathLengthM: number): number {
  return thicknessOf(radiiUm, weightsPerM3, extinctionEfficiencies(radiiUm, medium), pathLengthM);
}

export interface CurtainTransmittance {
  opticalDepth: number;
  transmittance: number;
  /** Smallest and largest Q_ext over the drops; empty where there are no drops. */
  qExtRange: number[];
  wavelengthNm: number;
}

/** The rain curtain along a line of sight: τ and T = exp(−τ) at CURTAIN_WAVELENGTH_NM. */
export function curtainTransmittance(
  drops: { radiiUm: Float64Array; weights: Float64Array },
  water: DropWater,
  pathLengthM: number,
): CurtainTransmittance {
  const medium = dropMedium(water, CURTAIN_WAVELENGTH_NM);
  const qExt = extinctionEfficiencies(drops.radiiUm, medium);
  const tau = thicknessOf(drops.radiiUm, drops.weights, qExt, pathLengthM);
  // No drops at all (every bin empty): no efficiency range to report, an empty one rather than ±Infinity.
  const qExtRange = qExt.length > 0 ? [Math.min(...qExt), Math.max(...qExt)] : [];
  return { opticalDepth: tau, transmittance: Math.exp(-tau), qExtRange, wavelengthNm: CURTAIN_WAVELENGTH_NM };
}
