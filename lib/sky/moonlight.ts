// The moon as a light source: its disc, its brightness by phase and its spectrum, above the atmosphere.

import { roloLunarReflectance } from "../data/rolo-lunar-reflectance.js";
import { astmG173Spectrum } from "../sun/astm-g173.js";
import { cmfTables } from "../colour/observers.js";
import { interpolateAt } from "../spectra/spectrum.js";
import { makeWavelengthGrid, wavelengthsNm } from "../spectra/grid.js";

/** Mean lunar radius, km (IAU WGCCRE: Archinal et al. 2018, Celest. Mech. Dyn. Astron. 130, 22). */
export const MOON_MEAN_RADIUS_KM = 1737.4;
/** Mean earth–moon distance, km, at which Krisciunas & Schaefer's brightness holds (the semi-major axis, 384 400 km; from memory). */
export const MOON_MEAN_DISTANCE_KM = 384400;
/** One foot-candle in lux: 1 lm/ft², 1 ft = 0.3048 m exactly. */
const LUX_PER_FOOTCANDLE = 1 / (0.3048 * 0.3048);
/** Maximum luminous efficacy of photopic vision, lm/W (CIE 015:2018, K_m = 683 lm/W). */
const KM_LM_PER_W = 683;

export function moonAngularDiameterDeg(distanceKm: number): number {
  return (2 * Math.asin(MOON_MEAN_RADIUS_KM / distanceKm) * 180) / Math.PI;
}

/** The moon's V magnitude at mean distance, m = −12.73 + 0.026|α| + 4×10⁻⁹ α⁴, α in degrees (Krisciunas & Schaefer 1991, PASP 103, 1033, eq. 9). */
export function moonMagnitude(phaseAngleDeg: number): number {
  const a = Math.abs(phaseAngleDeg);
  return -12.73 + 0.026 * a + 4e-9 * a ** 4;
}

/**
 * Illuminance by the moon above the atmosphere, lux: I* = 10^(−0.4 (m + 16.57)) foot-candles (Krisciunas &
 * Schaefer 1991, eq. 8), at mean distance, scaled by the inverse square of the distance. The opposition surge
 * within about 7° of full is not in the formula (their §3).
 */
export function moonIlluminanceLux(phaseAngleDeg: number, distanceKm = MOON_MEAN_DISTANCE_KM): number {
  const footcandles = 10 ** (-0.4 * (moonMagnitude(phaseAngleDeg) + 16.57));
  return footcandles * LUX_PER_FOOTCANDLE * (MOON_MEAN_DISTANCE_KM / distanceKm) ** 2;
}

// ROLO constants of eq. 10 (Kieffer & Stone 2005, Table 4 notes): the exponential and cosine terms take g in degrees.
const P1_DEG = 4.06054;
const P2_DEG = 12.8802;
const P3_DEG = -30.5858;
const P4_DEG = 16.7498;

/**
 * The moon's disk-equivalent reflectance A at one ROLO band for a phase angle (Kieffer & Stone 2005, Astron. J.
 * 129, 2887, eq. 10) with the libration and selenographic-longitude terms (b, c) left out: they change A by a few
 * per cent at most phases, and a render gives no libration.
 */
function roloBandReflectance(band: number, phaseAngleDeg: number): number {
  const c = roloLunarReflectance.columns;
  const gDeg = Math.abs(phaseAngleDeg);
  const g = (gDeg * Math.PI) / 180;
  const polynomial = c.a0[band] + g * (c.a1[band] + g * (c.a2[band] + g * c.a3[band]));
  const opposition = c.d1[band] * Math.exp(-gDeg / P1_DEG) + c.d2[band] * Math.exp(-gDeg / P2_DEG) + c.d3[band] * Math.cos((gDeg - P3_DEG) / P4_DEG);
  return Math.exp(polynomial + opposition);
}

/** ROLO reflectance at any wavelength in the tabulated span: ln A linear between neighbouring bands. */
export function lunarReflectance(wavelengthNm: number, phaseAngleDeg: number): number {
  const w = roloLunarReflectance.wavelengthsNm;
  if (!(wavelengthNm >= w[0] && wavelengthNm <= w[w.length - 1])) throw new RangeError(`ROLO bands span ${w[0]}–${w[w.length - 1]} nm, not ${wavelengthNm} nm`);
  let i = 0;
  while (i < w.length - 2 && w[i + 1] < wavelengthNm) i++;
  const t = (wavelengthNm - w[i]) / (w[i + 1] - w[i]);
  return Math.exp((1 - t) * Math.log(roloBandReflectance(i, phaseAngleDeg)) + t * Math.log(roloBandReflectance(i + 1, phaseAngleDeg)));
}

export interface Moonlight {
  /** Wavelengths of the table, nm (360–830, 1 nm). */
  wavelengthsNm: Float64Array;
  /** Spectral irradiance above the atmosphere, W m⁻² nm⁻¹. */
  irradiance: Float64Array;
  illuminanceLux: number;
  discDeg: number;
  /** Illuminance of the unscaled reflectance model, E = A Ω E☉/π (Kieffer & Stone 2005, eq. 8): a cross-check. */
  reflectanceModelLux: number;
}

const TABLE_GRID = makeWavelengthGrid(360, 830, 1);

/**
 * Moonlight above the atmosphere: sunlight (ASTM G173-03 extraterrestrial) reflected with the ROLO reflectance's
 * spectral shape at this phase, scaled to Krisciunas & Schaefer's illuminance. The sun–moon distance is taken
 * as 1 au (it differs by under 0.3 %).
 */
export function moonlight(phaseAngleDeg: number, distanceKm = MOON_MEAN_DISTANCE_KM): Moonlight {
  const wl = wavelengthsNm(TABLE_GRID);
  const sun = astmG173Spectrum(TABLE_GRID, "extraterrestrial").values;
  const yBar = cmfTables("cie1931-2").yBar;
  const radius = MOON_MEAN_RADIUS_KM / distanceKm;
  // Solid angle of the disc, Ω = 2π(1 − cos θ) with sin θ = R/d.
  const solidAngleSr = 2 * Math.PI * (1 - Math.sqrt(1 - radius * radius));
  const reflected = wl.map((w, i) => (lunarReflectance(w, phaseAngleDeg) * solidAngleSr * sun[i]) / Math.PI);
  let lux = 0;
  for (let i = 0; i < wl.length; i++) lux += KM_LM_PER_W * reflected[i] * interpolateAt(yBar, wl[i]) * TABLE_GRID.stepNm;
  const illuminanceLux = moonIlluminanceLux(phaseAngleDeg, distanceKm);
  const scale = illuminanceLux / lux;
  return {
    wavelengthsNm: wl,
    irradiance: reflected.map((v) => v * scale),
    illuminanceLux,
    discDeg: moonAngularDiameterDeg(distanceKm),
    reflectanceModelLux: lux,
  };
}
