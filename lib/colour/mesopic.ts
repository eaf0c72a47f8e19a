// Mesopic photometry (CIE 191:2010, "Recommended system for mesopic photometry based on visual performance",
// the MES2 system): between 0.005 and 5 cd/m² the eye's spectral efficiency is a blend of the photopic V(λ) and the
// scotopic V′(λ), weighted by an adaptation coefficient m found from the adapting field.

import { cieScotopic1951 } from "../data/cie-scotopic-1951.js";
import type { WavelengthGrid } from "../spectra/grid.js";
import { wavelengthsNm } from "../spectra/grid.js";
import { interpolateAt, regularTable } from "../spectra/spectrum.js";

/** Maximum scotopic luminous efficacy K′m = 1700 lm/W (CIE 1951; ISO 23539:2005 / CIE S 010, as 1700). */
export const SCOTOPIC_EFFICACY_LM_PER_W = 1700;
/** V′(λ0) at λ0 = 555 nm, the photopic peak: 0.402 (CIE 191:2010, eq. for Lmes; the V′ table at 555 nm). */
export const V_PRIME_AT_555 = 0.402;
/** CIE 191:2010 MES2 coefficients of m = a + b·log10(Lmes). */
export const MES2_A = 0.767;
export const MES2_B = 0.3334;
/** CIE 191:2010's mesopic range: photopic above, scotopic below. */
export const MESOPIC_UPPER_CD_PER_M2 = 5;
export const MESOPIC_LOWER_CD_PER_M2 = 0.005;

const vPrimeTable = regularTable(cieScotopic1951.startNm, cieScotopic1951.stepNm, cieScotopic1951.columns.vPrime);

/** V′(λ) on a grid; 0 outside the tabulated 380–780 nm (V′ is below 6e-4 there). */
export function scotopicEfficiency(grid: WavelengthGrid): Float64Array {
  return wavelengthsNm(grid).map((w) => (w < 380 || w > 780 ? 0 : interpolateAt(vPrimeTable, w)));
}

/** Scotopic luminance (or illuminance) of spectra laid out sample-major on the grid: K′m ∫ L V′ dλ. */
export function scotopicOf(grid: WavelengthGrid, spectra: Float64Array): Float64Array {
  const v = scotopicEfficiency(grid);
  const n = grid.count;
  const out = new Float64Array(spectra.length / n);
  for (let s = 0; s < out.length; s++) {
    let sum = 0;
    for (let i = 0; i < n; i++) sum += spectra[s * n + i] * v[i];
    out[s] = SCOTOPIC_EFFICACY_LM_PER_W * sum * grid.stepNm;
  }
  return out;
}

/** Lmes = (m Lp + (1 − m) Ls V′(λ0)) / (m + (1 − m) V′(λ0)) (CIE 191:2010, the MES2 mesopic luminance). */
export function mesopicLuminance(photopic: number, scotopic: number, m: number): number {
  return (m * photopic + (1 - m) * scotopic * V_PRIME_AT_555) / (m + (1 - m) * V_PRIME_AT_555);
}

export interface MesopicAdaptation {
  /** 1 photopic, 0 scotopic. */
  m: number;
  mesopicCdPerM2: number;
  iterations: number;
}

/**
 * The adaptation coefficient m of an adapting field with photopic luminance Lp and scotopic luminance Ls: CIE
 * 191:2010's fixed-point iteration from m0 = 0.5, Lmes,n from m(n−1) and m_n = a + b log10(Lmes,n), clamped to
 * [0, 1]; m = 1 at and above 5 cd/m², 0 at and below 0.005 cd/m² (of Lmes). It converges for S/P below 18.18
 * ("Theoretical consideration on convergence of the fixed-point iteration method in CIE mesopic photometry system MES2", Opt. Express 26, 31351, 2018), far above any daylight or moonlight (about 1–3).
 */
export function mesopicAdaptation(photopic: number, scotopic: number): MesopicAdaptation {
  let m = 0.5;
  let lmes = mesopicLuminance(photopic, scotopic, m);
  let iterations = 0;
  for (; iterations < 200; iterations++) {
    lmes = mesopicLuminance(photopic, scotopic, m);
    const next = lmes >= MESOPIC_UPPER_CD_PER_M2 ? 1 : lmes <= MESOPIC_LOWER_CD_PER_M2 ? 0 : Math.min(1, Math.max(0, MES2_A + MES2_B * Math.log10(lmes)));
    if (Math.abs(next - m) < 1e-9) {
      m = next;
      break;
    }
    m = next;
  }
  return { m, mesopicCdPerM2: mesopicLuminance(photopic, scotopic, m), iterations };
}
