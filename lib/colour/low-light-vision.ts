// What a dark-adapted human eye sees of a spectrum, as CIE XYZ for display: the luminance is the CIE 191:2010
// mesopic luminance, and the colour is carried by the cones' share of it only; the rods' share is seen without
// hue, as the bluish grey of night vision.

import { V_PRIME_AT_555, mesopicAdaptation, scotopicOf, type MesopicAdaptation } from "./mesopic.js";
import { spectrumToXyz } from "./tristimulus.js";
import type { Spectrum } from "../spectra/spectrum.js";

/** Maximum photopic luminous efficacy K_m = 683 lm/W (CIE 015:2018). */
const PHOTOPIC_EFFICACY_LM_PER_W = 683;
/** The scene's adapting surface: level ground of 18 % reflectance (the mid-grey of photographic exposure; common practice). */
export const ADAPTING_REFLECTANCE = 0.18;

/**
 * Chromaticity at which the rods' signal is shown: the blue shift of night scenes, x = y = 0.25 as used for the
 * scotopic component in night rendering (Jensen, Durand, Stark, Premože, Dorsey & Shirley 2001, "A physically-
 * based night sky model", SIGGRAPH, §8 tone mapping; from memory).
 */
export const SCOTOPIC_CHROMATICITY = { x: 0.25, y: 0.25 } as const;

export interface EyeAdaptation extends MesopicAdaptation {
  /** Share of each sample's mesopic luminance carried by the cones, m/(m + (1 − m)V′(λ0)) (CIE 191:2010). */
  coneShare: number;
  adaptingPhotopicCdPerM2: number;
  adaptingScotopicCdPerM2: number;
}

/** The eye's state for an adapting field given by its photopic and scotopic luminance. */
export function eyeAdaptation(adaptingPhotopicCdPerM2: number, adaptingScotopicCdPerM2: number): EyeAdaptation {
  const a = mesopicAdaptation(adaptingPhotopicCdPerM2, adaptingScotopicCdPerM2);
  return { ...a, coneShare: a.m / (a.m + (1 - a.m) * V_PRIME_AT_555), adaptingPhotopicCdPerM2, adaptingScotopicCdPerM2 };
}

/**
 * In place: absolute XYZ (Y in cd/m²) of each sample, with its scotopic luminance, become what the eye sees.
 * Lmes = w Lp + (1 − w) Ls with w the cone share, which is CIE 191:2010's Lmes at the adaptation's m; the cone part
 * keeps the sample's chromaticity, the rod part has SCOTOPIC_CHROMATICITY. At m = 1 (photopic) nothing changes.
 */
export function applyEyeToXyz(xyzAbsolute: Float64Array, scotopicCdPerM2: Float64Array, eye: EyeAdaptation): void {
  const w = eye.coneShare;
  if (w === 1) return;
  const { x, y } = SCOTOPIC_CHROMATICITY;
  for (let i = 0; i < scotopicCdPerM2.length; i++) {
    const rod = (1 - w) * scotopicCdPerM2[i];
    xyzAbsolute[3 * i] = w * xyzAbsolute[3 * i] + (rod * x) / y;
    xyzAbsolute[3 * i + 1] = w * xyzAbsolute[3 * i + 1] + rod;
    xyzAbsolute[3 * i + 2] = w * xyzAbsolute[3 * i + 2] + (rod * (1 - x - y)) / y;
  }
}

/**
 * The adapting field of a scene lit by `irradiance` (W m⁻² nm⁻¹ normal to the beam) from `elevationDeg`: level
 * Lambertian ground of 18 % reflectance in the direct light alone, L = ρ E sin(h)/π, photopic and scotopic; or,
 * when given, a photopic luminance with the light's own S/P ratio.
 */
export function sceneEyeAdaptation(irradiance: Spectrum, elevationDeg: number, givenCdPerM2?: number): EyeAdaptation {
  const photopicLux = PHOTOPIC_EFFICACY_LM_PER_W * spectrumToXyz(irradiance, "cie1931-2").Y;
  const scotopicLux = scotopicOf(irradiance.grid, irradiance.values)[0];
  if (givenCdPerM2 !== undefined) {
    const sOverP = photopicLux > 0 ? scotopicLux / photopicLux : 1;
    return eyeAdaptation(givenCdPerM2, givenCdPerM2 * sOverP);
  }
  const ground = (ADAPTING_REFLECTANCE * Math.sin((Math.max(0, elevationDeg) * Math.PI) / 180)) / Math.PI;
  return eyeAdaptation(ground * photopicLux, ground * scotopicLux);
}
