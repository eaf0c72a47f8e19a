import { standardAirIndex } from "./air-index.js";
import { IAPWS_R9_97_WAVELENGTH_NM, iapwsRefractiveIndex } from "./iapws-r9-97.js";
import { liquidWaterDensityKgPerM3 } from "./liquid-density.js";
import {
  QUAN_FRY_SALINITY_PSU,
  QUAN_FRY_TEMPERATURE_C,
  QUAN_FRY_WAVELENGTH_NM,
  quanFryIndexRelativeToAir,
} from "./quan-fry-1995.js";

/** Temperatures accepted: IAPWS R9-97's supercooled limit (−12 °C) up to Kell 1975's 150 °C. */
export const WATER_TEMPERATURE_C = { min: 261.15 - 273.15, max: 150 } as const;
export const WATER_WAVELENGTH_NM = IAPWS_R9_97_WAVELENGTH_NM;
/** With salt, wavelength and salinity are limited to Quan & Fry's fit; temperature outside 0–30 °C is extrapolated. */
export const SEA_WATER_WAVELENGTH_NM = QUAN_FRY_WAVELENGTH_NM;
export const SEA_WATER_SALINITY_PSU = QUAN_FRY_SALINITY_PSU;
export const SEA_WATER_TEMPERATURE_C = QUAN_FRY_TEMPERATURE_C;

const KELVIN_AT_ZERO_C = 273.15;

export interface WaterIndexQuery {
  /** Vacuum wavelength. */
  wavelengthNm: number;
  temperatureC: number;
  salinityPsu: number;
}

export interface WaterIndex {
  /** Real index relative to vacuum. */
  n: number;
  /** Real index relative to standard dry air (Ciddor 1996). */
  nRelativeToAir: number;
  /** Absorption index (imaginary part of m = n + ik). */
  k: number;
  source: string;
}

function checkRange(name: string, value: number, range: { min: number; max: number }): void {
  if (!(value >= range.min && value <= range.max)) {
    throw new RangeError(`${name} ${value} outside ${range.min}..${range.max}`);
  }
}

/**
 * Complex index of fresh or sea water. Pure water: IAPWS R9-97 at the Kell 1975 density. Salt adds
 * Quan & Fry's salinity increment QF(S) − QF(0) (relative to air, times n_air, at the in-air wavelength), so the
 * sea-water index joins the IAPWS value exactly at S = 0 instead of jumping by Quan–Fry's own offset.
 */
export function waterIndex({ wavelengthNm, temperatureC, salinityPsu }: WaterIndexQuery): WaterIndex {
  checkRange("wavelengthNm", wavelengthNm, WATER_WAVELENGTH_NM);
  checkRange("temperatureC", temperatureC, WATER_TEMPERATURE_C);
  checkRange("salinityPsu", salinityPsu, SEA_WATER_SALINITY_PSU);
  const density = liquidWaterDensityKgPerM3(temperatureC);
  const nPure = iapwsRefractiveIndex(wavelengthNm, temperatureC + KELVIN_AT_ZERO_C, density);
  const nAir = standardAirIndex(wavelengthNm);
  let n = nPure;
  let source = "IAPWS R9-97 with Kell 1975 density";
  if (salinityPsu > 0) {
    checkRange("wavelengthNm (with salinity)", wavelengthNm, SEA_WATER_WAVELENGTH_NM);
    const wavelengthInAirNm = wavelengthNm / nAir;
    const increment =
      quanFryIndexRelativeToAir(wavelengthInAirNm, temperatureC, salinityPsu) -
      quanFryIndexRelativeToAir(wavelengthInAirNm, temperatureC, 0);
    n = nPure + increment * nAir;
    source += " + Quan & Fry 1995 salinity increment";
    const tRange = SEA_WATER_TEMPERATURE_C;
    if (temperatureC < tRange.min || temperatureC > tRange.max) {
      source += ` (extrapolated outside ${tRange.min}–${tRange.max} °C)`;
    }
  }
  source += "; air: Ciddor 1996 standard dry air; k = 0: absorption neglected";
  return { n, nRelativeToAir: n / nAir, k: 0, source };
}
