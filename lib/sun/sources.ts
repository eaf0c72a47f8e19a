import type { WavelengthGrid } from "../spectra/grid.js";
import { type Spectrum, resample, tabulated } from "../spectra/spectrum.js";
import { type AstmG173Column, astmG173Spectrum } from "./astm-g173.js";
import { type SlantPath, attenuateAlongSlantPath } from "./atmosphere.js";
import { blackbodySpectrum } from "./blackbody.js";
import { cieDaylightSpectrum, d65Spectrum } from "./daylight.js";

export type SunSpectrumSource =
  | { readonly kind: "blackbody"; readonly temperatureK: number }
  | { readonly kind: "cie-d65" }
  | { readonly kind: "cie-daylight"; readonly cctK: number }
  | { readonly kind: "astm-g173"; readonly column: AstmG173Column }
  | { readonly kind: "table"; readonly wavelengthsNm: ArrayLike<number>; readonly values: ArrayLike<number> };

export function sunSpectrum(source: SunSpectrumSource, grid: WavelengthGrid): Spectrum {
  switch (source.kind) {
    case "blackbody":
      return blackbodySpectrum(grid, source.temperatureK);
    case "cie-d65":
      return d65Spectrum(grid);
    case "cie-daylight":
      return cieDaylightSpectrum(grid, source.cctK);
    case "astm-g173":
      return astmG173Spectrum(grid, source.column);
    case "table":
      return resample(tabulated(source.wavelengthsNm, source.values), grid);
    default:
      throw new RangeError(`unknown sun spectrum kind ${String((source as { kind: unknown }).kind)}`);
  }
}

/** Default sunlight at the ground: ASTM G173-03 extraterrestrial spectrum attenuated along the slant path. */
export function sunlightAtGround(grid: WavelengthGrid, path: SlantPath): Spectrum {
  return attenuateAlongSlantPath(astmG173Spectrum(grid, "extraterrestrial"), path);
}
