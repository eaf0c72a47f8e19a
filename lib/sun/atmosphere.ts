import { type WavelengthGrid, wavelengthsNm } from "../spectra/grid.js";
import { type Spectrum, multiplySpectra } from "../spectra/spectrum.js";

/** Standard sea-level pressure of Bucholtz's (1995) US Standard Atmosphere 1962 tables. */
export const STANDARD_PRESSURE_HPA = 1013.25;

/** Ångström turbidity defaults: α = 1.3, the mean wavelength exponent Ångström (1929) proposed for natural atmospheres; β = 0.05 for a clear sky (common practice). */
export const DEFAULT_ANGSTROM_BETA = 0.05;
export const DEFAULT_ANGSTROM_ALPHA = 1.3;

/** Relative optical air mass, Kasten & Young 1989 (Appl. Opt. 28, 4735, Eq. 3 as public implementations cite it; coefficients as in pvlib-python; tested against the paper's Table II), apparent elevation. */
export function relativeAirMass(elevationDeg: number): number {
  if (!(elevationDeg >= 0 && elevationDeg <= 90)) throw new RangeError(`air mass needs a solar elevation in 0–90°, got ${elevationDeg}`);
  const zenithDeg = 90 - elevationDeg;
  return 1 / (Math.cos((zenithDeg * Math.PI) / 180) + 0.50572 * (96.07995 - zenithDeg) ** -1.6364);
}

/** Rayleigh optical depth, Bucholtz 1995 (Appl. Opt. 34, 2765) fit τ = A λ^−(B + Cλ + D/λ), coefficients as reproduced in public code (equation number not checked); ∝ p/p0 from memory. */
export function rayleighOpticalDepth(wavelengthNm: number, pressureHpa = STANDARD_PRESSURE_HPA): number {
  const um = wavelengthNm / 1000;
  if (!(um >= 0.2 && um <= 2.2)) throw new RangeError(`Bucholtz (1995) fit holds for 200–2200 nm, not ${wavelengthNm} nm`);
  const [a, b, c, d] = um <= 0.5 ? [6.50362e-3, 3.55212, 1.35579, 0.11563] : [8.64627e-3, 3.99668, 1.10298e-3, 2.71393e-2];
  return (pressureHpa / STANDARD_PRESSURE_HPA) * a * um ** -(b + c * um + d / um);
}

/** Aerosol optical depth by Ångström's law τ = β λ_µm^−α (Ångström 1929, Geogr. Ann. 11, 156). */
export function aerosolOpticalDepth(wavelengthNm: number, beta = DEFAULT_ANGSTROM_BETA, alpha = DEFAULT_ANGSTROM_ALPHA): number {
  return beta * (wavelengthNm / 1000) ** -alpha;
}

export interface SlantPath {
  readonly elevationDeg: number;
  readonly pressureHpa?: number;
  readonly angstromBeta?: number;
  readonly angstromAlpha?: number;
}

/** Direct-beam transmittance T = exp(−m (τ_R + τ_a)) (Beer–Lambert–Bouguer law), no ozone or water vapour. */
export function slantPathTransmittance(grid: WavelengthGrid, path: SlantPath): Spectrum {
  const m = relativeAirMass(path.elevationDeg);
  const values = wavelengthsNm(grid).map(
    (w) => Math.exp(-m * (rayleighOpticalDepth(w, path.pressureHpa) + aerosolOpticalDepth(w, path.angstromBeta, path.angstromAlpha))),
  );
  return { grid, values };
}

/**
 * Attenuate a top-of-atmosphere spectrum along the slant path. Meant for the ASTM extraterrestrial
 * spectrum: D65, daylight or ASTM global/direct already include an atmosphere, which would be counted twice.
 */
export function attenuateAlongSlantPath(topOfAtmosphere: Spectrum, path: SlantPath): Spectrum {
  return multiplySpectra(topOfAtmosphere, slantPathTransmittance(topOfAtmosphere.grid, path));
}
