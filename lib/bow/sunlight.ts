// The direct sunlight that falls on the rain, in W m⁻² nm⁻¹ on the wavelength grid.

import type { WavelengthGrid } from "../spectra/grid.js";
import { wavelengthsNm } from "../spectra/grid.js";
import type { Spectrum } from "../spectra/spectrum.js";
import { sunSpectrum, type SunSpectrumSource } from "../sun/sources.js";
import { astmG173Spectrum } from "../sun/astm-g173.js";
import { planckSpectralRadiance } from "../sun/blackbody.js";
import { attenuateAlongSlantPath, type SlantPath } from "../sun/atmosphere.js";
import { ASTRONOMICAL_UNIT_KM, NOMINAL_SOLAR_RADIUS_KM } from "../sun/disc.js";

export type Attenuation = "auto" | "always" | "never";

export interface Sunlight {
  irradiance: Spectrum;
  attenuated: boolean;
  /** How the spectrum's absolute scale was set; for the output's meta. */
  scaleNote: string;
}

/** Spectra that describe light above the atmosphere; the others already passed through it. */
function isTopOfAtmosphere(source: SunSpectrumSource): boolean {
  return source.kind === "blackbody" || (source.kind === "astm-g173" && source.column === "extraterrestrial");
}

function integral(s: Spectrum): number {
  let sum = 0;
  for (const v of s.values) sum += v;
  return sum * s.grid.stepNm;
}

export function directSunlight(source: SunSpectrumSource, grid: WavelengthGrid, path: SlantPath, attenuation: Attenuation): Sunlight {
  let spectrum = sunSpectrum(source, grid);
  let scaleNote: string;
  switch (source.kind) {
    case "astm-g173":
    case "table":
      scaleNote = "absolute, as tabulated (W m⁻² nm⁻¹)";
      break;
    case "blackbody": {
      // E = π B (R/d)²: a Lambertian disc of radius R seen from distance d (Planck radiance, CODATA 2018).
      const ratio = NOMINAL_SOLAR_RADIUS_KM / ASTRONOMICAL_UNIT_KM;
      const wl = wavelengthsNm(grid);
      spectrum = { grid, values: wl.map((w) => Math.PI * planckSpectralRadiance(w, source.temperatureK) * ratio * ratio) };
      scaleNote = "absolute: a blackbody disc of the sun's nominal radius at 1 au";
      break;
    }
    default: {
      // Relative daylight spectra get the visible irradiance of ASTM G173-03's direct-circumsolar spectrum.
      const reference = integral(astmG173Spectrum(grid, "direct-circumsolar"));
      const factor = reference / integral(spectrum);
      spectrum = { grid, values: spectrum.values.map((v) => v * factor) };
      scaleNote = "relative spectrum scaled to the in-band irradiance of ASTM G173-03 direct-circumsolar";
    }
  }
  const attenuate = attenuation === "always" || (attenuation === "auto" && isTopOfAtmosphere(source));
  if (attenuate) spectrum = attenuateAlongSlantPath(spectrum, path);
  return { irradiance: spectrum, attenuated: attenuate, scaleNote };
}
