// From spectral radiance to colour: CIE XYZ per sample, degree of linear polarisation, an optional polariser,
// normalisation, and the output space.

import type { WavelengthGrid } from "../spectra/grid.js";
import { spectraToXyz, weightedSums, chromaticities, luminanceReciprocal, type Xyz } from "../colour/tristimulus.js";
import { colourMatchingFunctions, type Observer } from "../colour/observers.js";
import { renderXyz, type WhiteHandling } from "../colour/render.js";
import type { OutputSpaceId } from "../colour/output-spaces.js";
import type { GamutMethod } from "../colour/gamut.js";
import type { SpectralProfile } from "./lattice-profile.js";
import { applyEyeToXyz, type EyeAdaptation } from "../colour/low-light-vision.js";
import { scotopicOf } from "../colour/mesopic.js";

/** Maximum luminous efficacy K_m = 683 lm/W (CIE 015:2018 §7.1; the SI definition of the candela). */
export const LUMINOUS_EFFICACY_LM_PER_W = 683;

export type Normalisation = "peak" | "physical";

export interface ColourOptions {
  observer: Observer;
  space: OutputSpaceId;
  gamut: GamutMethod;
  white: WhiteHandling;
  normalise: Normalisation;
  /** Angle of a linear polariser's transmission axis to the bow's tangent, degrees; undefined for none. */
  polariserDeg?: number;
  /** XYZ of the direct sunlight (any scale), the white under white = "sun". */
  sunWhite: Xyz;
  /** A human eye at this adaptation instead of a colorimetric camera (output.vision = "eye"). */
  eye?: EyeAdaptation;
}

export interface ColourProfile {
  /** Interleaved XYZ: relative (peak Y = 1) or absolute (Y in cd/m²). */
  xyz: Float64Array;
  chromaticity: Float64Array;
  /** Y of each sample in the normalisation's unit. */
  luminance: Float64Array;
  /** Absolute luminance, cd/m², whatever the normalisation. */
  luminanceCdPerM2: Float64Array;
  rgb: Float64Array;
  outOfGamut: Uint8Array;
  /** (I⊥ − I∥)/(I⊥ + I∥) of the luminance, before any polariser; > 0 means polarised along the bow. */
  polarisation: Float64Array;
  /** Factor from absolute XYZ (Y in cd/m²) to the xyz returned. */
  scale: number;
  whiteAdaptation: string;
  spaceAdaptation: string;
}

/**
 * Through an ideal linear polariser at angle α to the bow's tangent the field along the tangent (perpendicular
 * to the scattering plane, S1) passes with cos²α and the radial one (S2) with sin²α (Malus's law).
 */
export function colourProfile(spectral: SpectralProfile, grid: WavelengthGrid, options: ColourOptions): ColourProfile {
  const count = spectral.anglesDeg.length;
  const nl = grid.count;
  const radiance = new Float64Array(count * nl);
  const { cos2, sin2 } = polariserWeights(options.polariserDeg);
  for (let k = 0; k < radiance.length; k++) {
    radiance[k] = cos2 * spectral.perpendicular[k] + sin2 * spectral.parallel[k];
  }
  const xyzPerp = spectraToXyz(grid, spectral.perpendicular, options.observer);
  const xyzPar = spectraToXyz(grid, spectral.parallel, options.observer);
  const polarisation = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    const a = xyzPerp[3 * i + 1];
    const b = xyzPar[3 * i + 1];
    polarisation[i] = a + b > 0 ? (a - b) / (a + b) : 0;
  }

  const xyzAbsolute = absoluteXyz(radiance, grid, options);
  const luminanceCdPerM2 = new Float64Array(count);
  let peak = 0;
  for (let i = 0; i < count; i++) {
    luminanceCdPerM2[i] = xyzAbsolute[3 * i + 1];
    peak = Math.max(peak, luminanceCdPerM2[i]);
  }
  const scale = options.normalise === "peak" ? luminanceReciprocal(peak) || 1 : 1;
  const xyz = xyzAbsolute.map((v) => v * scale);
  const luminance = new Float64Array(count);
  for (let i = 0; i < count; i++) luminance[i] = xyz[3 * i + 1];

  // Encoded spaces need values in [0, 1]: in physical mode they are computed relative to the peak.
  const encoded = options.space === "srgb" || options.space === "display-p3" || options.space === "rec2020";
  const rgbInput = encoded && options.normalise === "physical" && peak > 0 ? xyzAbsolute.map((v) => v / peak) : xyz;
  const rendered = renderXyz(rgbInput, {
    space: options.space,
    gamut: options.gamut,
    white: options.white,
    sunWhite: options.sunWhite,
  });
  return {
    xyz,
    chromaticity: chromaticities(xyz),
    luminance,
    luminanceCdPerM2,
    rgb: rendered.values,
    outOfGamut: rendered.outOfGamut,
    polarisation,
    scale,
    whiteAdaptation: rendered.whiteAdaptation,
    spaceAdaptation: rendered.spaceAdaptation,
  };
}

/** Malus's law weights of the tangential (cos²α) and radial (sin²α) fields; both 1 without a polariser. */
export function polariserWeights(polariserDeg: number | undefined): { cos2: number; sin2: number } {
  const cos2 = polariserDeg === undefined ? 1 : Math.cos((polariserDeg * Math.PI) / 180) ** 2;
  return { cos2, sin2: polariserDeg === undefined ? 1 : 1 - cos2 };
}

/** XYZ with Y in cd/m² of radiance spectra (K_m · CIE 015:2018 Eq. 7.1), through the eye at low light where asked. */
function absoluteXyz(radiance: Float64Array, grid: WavelengthGrid, options: ColourOptions): Float64Array {
  const xyz = spectraToXyz(grid, radiance, options.observer);
  for (let k = 0; k < xyz.length; k++) xyz[k] *= LUMINOUS_EFFICACY_LM_PER_W;
  if (options.eye) applyEyeToXyz(xyz, scotopicOf(grid, radiance), options.eye);
  return xyz;
}

/**
 * Per-wavelength weights of the colour sum of light scattered under one sunlight: K_m·Δλ·E(λ)·s·x̄(λ), likewise ȳ, z̄
 * (CIE 015:2018 Eq. 7.1, K_m §7.1), so that XYZ in cd/m² of a unit profile (radiance per unit sunlight and path)
 * is one dot product per sample. The light enters linearly, wavelength by wavelength (van de Hulst 1957 §1.2).
 */
export function sunlitXyzWeights(grid: WavelengthGrid, observer: Observer, sunIrradiance: Float64Array, pathLengthM: number): Float64Array[] {
  const cmf = colourMatchingFunctions(observer, grid);
  return [cmf.xBar.values, cmf.yBar.values, cmf.zBar.values].map((bar) =>
    Float64Array.from(bar, (v, l) => LUMINOUS_EFFICACY_LM_PER_W * grid.stepNm * sunIrradiance[l] * pathLengthM * v),
  );
}

/** Interleaved XYZ (cd/m²) of unit spectra (sample s, wavelength l at s·count + l) under sunlitXyzWeights. */
export function weightedXyz(unitSpectra: Float64Array, weights: readonly Float64Array[]): Float64Array {
  return weightedSums(unitSpectra, weights, 1);
}

/**
 * The output space's values of absolute XYZ (cd/m²) for physical normalisation in a linear space (lookup textures),
 * rendered as colourProfile renders its rgb.
 */
export function linearRgbOfXyz(xyzAbsolute: Float64Array, options: Omit<ColourOptions, "observer" | "polariserDeg">): Float64Array {
  if (options.normalise !== "physical" || options.eye || options.space === "srgb" || options.space === "display-p3" || options.space === "rec2020") {
    throw new RangeError("linearRgbOfXyz: physical values in a linear space, colorimetric vision only");
  }
  return renderXyz(xyzAbsolute, { space: options.space, gamut: options.gamut, white: options.white, sunWhite: options.sunWhite }).values;
}
