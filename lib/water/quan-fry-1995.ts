// Empirical index of sea water relative to air, Quan & Fry 1995 (Appl. Opt. 34, 3477; coefficients as widely
// reproduced in public ocean-optics code); λ in nm (in air), T in °C, S in ‰. Fit ranges below: from memory.

/** Ranges of the data Quan & Fry fitted (Austin & Halikas 1976). */
export const QUAN_FRY_WAVELENGTH_NM = { min: 400, max: 700 } as const;
export const QUAN_FRY_TEMPERATURE_C = { min: 0, max: 30 } as const;
export const QUAN_FRY_SALINITY_PSU = { min: 0, max: 35 } as const;

// Quan & Fry 1995 coefficients n0..n9.
const N0 = 1.31405;
const N1 = 1.779e-4;
const N2 = -1.05e-6;
const N3 = 1.6e-8;
const N4 = -2.02e-6;
const N5 = 15.868;
const N6 = 0.01155;
const N7 = -0.00423;
const N8 = -4382;
const N9 = 1.1455e6;

/** Sea-water index relative to air; no range checks. */
export function quanFryIndexRelativeToAir(wavelengthNm: number, temperatureC: number, salinityPsu: number): number {
  const t = temperatureC;
  const s = salinityPsu;
  const l = wavelengthNm;
  return N0 + (N1 + N2 * t + N3 * t * t) * s + N4 * t * t + (N5 + N6 * s + N7 * t) / l + N8 / (l * l) + N9 / (l * l * l);
}
