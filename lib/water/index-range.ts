// The span of water's real index relative to air over every input the service accepts, and over every wavelength a
// request for one water may ask for, so that flattened drops' scattering planes can be traced at refractive-index
// nodes that do not depend on which wavelengths a request asks for (lib/bow/shaped-rows.ts).

import { waterIndex } from "./water-index.js";
import type { DropWater } from "./drop-medium.js";

/**
 * Extremes of waterIndex(...).nRelativeToAir (IAPWS R9-97 at the Kell 1975 density, Quan & Fry 1995's salinity
 * increment, Ciddor 1996 air: lib/water/water-index.ts) over vacuum wavelengths 360–830 nm (a request's spectral
 * range), water at −10–100 °C and salinity 0–35 PSU (salt water only at 400–700 nm): scanned every 1 nm and 1 °C,
 * the least is 1.313359 (830 nm, 100 °C, fresh water), the greatest 1.351569 (400 nm, −6 °C, 35 PSU); rounded
 * outwards to 1e-4. test/lib/water/index-range.test.ts repeats the scan.
 */
export const WATER_INDEX_RANGE = { min: 1.3133, max: 1.3516 } as const;

/** Wavelengths a request may ask for (vacuum, nm; schemas/profile.ts), and for salt water (Quan & Fry 1995's range). */
export const REQUEST_WAVELENGTHS_NM = { fresh: { min: 360, max: 830 }, salt: { min: 400, max: 700 } } as const;

/**
 * The span of this water's index relative to air over every wavelength a request may ask for: the ends of that
 * range, as water's dispersion is normal across it (the index falls as the wavelength grows in IAPWS R9-97 there),
 * which test/lib/water/index-range.test.ts checks by a scan. For fresh water at 15 °C: 1.3281–1.3481,
 * about half WATER_INDEX_RANGE.
 */
export function waterIndexSpan(water: DropWater): { min: number; max: number } {
  const range = water.salinityPsu > 0 ? REQUEST_WAVELENGTHS_NM.salt : REQUEST_WAVELENGTHS_NM.fresh;
  const at = (wavelengthNm: number) => waterIndex({ wavelengthNm, temperatureC: water.temperatureC, salinityPsu: water.salinityPsu }).nRelativeToAir;
  return { min: at(range.max), max: at(range.min) };
}
