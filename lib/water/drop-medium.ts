// The optical medium of a water drop in air at one wavelength: what every scattering engine, the kernel cache and
// the curtain's extinction read. The one place a water request becomes m = mRe + i·mIm relative to air.

import { waterIndex, type WaterIndexQuery } from "./water-index.js";

/** Optical constants of the drop at one wavelength: all a kernel row depends on besides size and angles. */
export interface DropMedium {
  /** Vacuum wavelength. */
  wavelengthNm: number;
  /** Real part of the drop's index relative to air. */
  mRe: number;
  /** Absorption index (imaginary part of m). */
  mIm: number;
  /** Index of the surrounding air: the wavelength in air is wavelengthNm / nAir. */
  nAir: number;
}

export type DropWater = Omit<WaterIndexQuery, "wavelengthNm">;

export interface DropMedia {
  media: DropMedium[];
  /** The water model's source line (the same at every wavelength: it depends on temperature and salinity). */
  source: string;
}

/** The drop's medium at each vacuum wavelength. */
export function dropMedia(water: DropWater, wavelengthsNm: ArrayLike<number>): DropMedia {
  const media: DropMedium[] = [];
  let source = "";
  for (let l = 0; l < wavelengthsNm.length; l++) {
    const wavelengthNm = wavelengthsNm[l];
    const idx = waterIndex({ wavelengthNm, temperatureC: water.temperatureC, salinityPsu: water.salinityPsu });
    // n_air as the ratio of the two indices waterIndex gives (n relative to vacuum over n relative to air).
    media.push({ wavelengthNm, mRe: idx.nRelativeToAir, mIm: idx.k, nAir: idx.n / idx.nRelativeToAir });
    source = idx.source;
  }
  return { media, source };
}

/** The drop's medium at one vacuum wavelength. */
export function dropMedium(water: DropWater, wavelengthNm: number): DropMedium {
  return dropMedia(water, [wavelengthNm]).media[0];
}
