import { cieDaylightComponents } from "../data/cie-daylight-components.js";
import { cieIlluminantD65 } from "../data/cie-illuminant-d65.js";
import { type WavelengthGrid, wavelengthsNm } from "../spectra/grid.js";
import { type Spectrum, regularTable, resample, interpolateAt } from "../spectra/spectrum.js";

export const DAYLIGHT_CCT_MIN_K = 4000;
export const DAYLIGHT_CCT_MAX_K = 25000;

/** CIE standard illuminant D65 (relative, 100 at 560 nm), 300–830 nm, resampled linearly. */
export function d65Spectrum(grid: WavelengthGrid): Spectrum {
  const { startNm, stepNm, columns } = cieIlluminantD65;
  return resample(regularTable(startNm, stepNm, columns.relative), grid);
}

/** Chromaticity of CIE daylight at a correlated colour temperature (CIE 015:2018; the same polynomials as CIE 015:2004 §3.1 and Wyszecki & Stiles 2000, pp. 145–146; equation numbers 4.7–4.9 from memory; checked against D65). */
export function cieDaylightChromaticity(cctK: number): { x: number; y: number } {
  if (!(cctK >= DAYLIGHT_CCT_MIN_K && cctK <= DAYLIGHT_CCT_MAX_K)) {
    throw new RangeError(`CIE daylight is defined for ${DAYLIGHT_CCT_MIN_K}–${DAYLIGHT_CCT_MAX_K} K, not ${cctK} K`);
  }
  const t = cctK;
  const x = t <= 7000
    ? -4.607e9 / t ** 3 + 2.9678e6 / t ** 2 + 0.09911e3 / t + 0.244063
    : -2.0064e9 / t ** 3 + 1.9018e6 / t ** 2 + 0.24748e3 / t + 0.23704;
  const y = -3.0 * x * x + 2.87 * x - 0.275;
  return { x, y };
}

/** M1, M2 of CIE 015:2018 Eq. 4.10, rounded to 3 decimals as the standard prescribes (the rounding that yields the internationally agreed D-illuminant tables; equation number from memory; reproduces D65). */
export function cieDaylightFactors(cctK: number): { m1: number; m2: number } {
  const { x, y } = cieDaylightChromaticity(cctK);
  const m = 0.0241 + 0.2562 * x - 0.7341 * y;
  const round3 = (v: number) => Math.round(v * 1000) / 1000;
  return { m1: round3((-1.3515 - 1.7703 * x + 5.9114 * y) / m), m2: round3((0.03 - 31.4424 * x + 30.0717 * y) / m) };
}

/** S(λ) = S0 + M1 S1 + M2 S2 (CIE 015:2018 Eq. 4.11), the 5 nm components interpolated linearly onto the grid. */
export function cieDaylightSpectrum(grid: WavelengthGrid, cctK: number): Spectrum {
  const { m1, m2 } = cieDaylightFactors(cctK);
  const { startNm, stepNm, columns } = cieDaylightComponents;
  const s0 = regularTable(startNm, stepNm, columns.s0);
  const s1 = regularTable(startNm, stepNm, columns.s1);
  const s2 = regularTable(startNm, stepNm, columns.s2);
  const values = wavelengthsNm(grid).map((w) => interpolateAt(s0, w) + m1 * interpolateAt(s1, w) + m2 * interpolateAt(s2, w));
  return { grid, values };
}
