import { astmG17303 } from "../data/astm-g173-03.js";
import type { WavelengthGrid } from "../spectra/grid.js";
import { type Spectrum, resample } from "../spectra/spectrum.js";

export type AstmG173Column = "extraterrestrial" | "global-tilt" | "direct-circumsolar";

const columnKey = { extraterrestrial: "extraterrestrial", "global-tilt": "globalTilt", "direct-circumsolar": "directCircumsolar" } as const;

/** ASTM G173-03 spectral irradiance, W m⁻² nm⁻¹ (280–1100 nm kept), resampled linearly onto the grid. */
export function astmG173Spectrum(grid: WavelengthGrid, column: AstmG173Column): Spectrum {
  const key = columnKey[column];
  if (!key) throw new RangeError(`unknown ASTM G173 column ${String(column)}`);
  return resample({ wavelengthsNm: astmG17303.wavelengthsNm, values: astmG17303.columns[key] }, grid);
}
