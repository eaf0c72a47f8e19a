import { type WavelengthGrid, wavelengthsNm } from "../spectra/grid.js";
import type { Spectrum } from "../spectra/spectrum.js";
import { BOLTZMANN_CONSTANT_J_PER_K, PLANCK_CONSTANT_J_S, SPEED_OF_LIGHT_M_PER_S } from "./physical-constants.js";

/** Planck's law B_λ(T) = 2hc²/λ⁵ / (exp(hc/λkT) − 1) (Planck 1901), in W m⁻² sr⁻¹ nm⁻¹. */
export function planckSpectralRadiance(wavelengthNm: number, temperatureK: number): number {
  if (!(temperatureK > 0) || !(wavelengthNm > 0)) throw new RangeError("temperature and wavelength must be positive");
  const h = PLANCK_CONSTANT_J_S;
  const c = SPEED_OF_LIGHT_M_PER_S;
  const lambdaM = wavelengthNm * 1e-9;
  const perMetre = (2 * h * c * c) / lambdaM ** 5 / Math.expm1((h * c) / (lambdaM * BOLTZMANN_CONSTANT_J_PER_K * temperatureK));
  return perMetre * 1e-9;
}

export function blackbodySpectrum(grid: WavelengthGrid, temperatureK: number): Spectrum {
  const values = wavelengthsNm(grid).map((w) => planckSpectralRadiance(w, temperatureK));
  return { grid, values };
}
