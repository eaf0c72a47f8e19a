import { cieXyz1931TwoDeg } from "../data/cie-xyz-1931-2deg.js";
import { cieXyz1964TenDeg } from "../data/cie-xyz-1964-10deg.js";
import type { WavelengthGrid } from "../spectra/grid.js";
import { type Spectrum, type TabulatedSpectrum, regularTable, resample } from "../spectra/spectrum.js";

export type Observer = "cie1931-2" | "cie1964-10";

export interface ColourMatchingFunctions {
  readonly observer: Observer;
  readonly xBar: Spectrum;
  readonly yBar: Spectrum;
  readonly zBar: Spectrum;
}

interface CmfTables {
  readonly xBar: TabulatedSpectrum;
  readonly yBar: TabulatedSpectrum;
  readonly zBar: TabulatedSpectrum;
}

// CIE 2019 data files note z̄10 = NaN above 559 nm: "not defined, extrapolate with zero" (ISO/CIE 11664-1:2019 dataset).
const nanToZero = (values: Float64Array): Float64Array => values.map((v) => (Number.isNaN(v) ? 0 : v));

function tablesOf(data: typeof cieXyz1931TwoDeg | typeof cieXyz1964TenDeg): CmfTables {
  const { startNm, stepNm, columns } = data;
  return {
    xBar: regularTable(startNm, stepNm, nanToZero(columns.xBar)),
    yBar: regularTable(startNm, stepNm, nanToZero(columns.yBar)),
    zBar: regularTable(startNm, stepNm, nanToZero(columns.zBar)),
  };
}

const tables: Record<Observer, CmfTables> = {
  "cie1931-2": tablesOf(cieXyz1931TwoDeg),
  "cie1964-10": tablesOf(cieXyz1964TenDeg),
};

/** The observer's tabulated CMFs (360–830 nm, 1 nm). */
export function cmfTables(observer: Observer): CmfTables {
  const t = tables[observer];
  if (!t) throw new RangeError(`unknown observer ${String(observer)}`);
  return t;
}

/** CMFs resampled onto a grid inside 360–830 nm (linear interpolation; outside the table: throws). */
export function colourMatchingFunctions(observer: Observer, grid: WavelengthGrid): ColourMatchingFunctions {
  const t = cmfTables(observer);
  return { observer, xBar: resample(t.xBar, grid), yBar: resample(t.yBar, grid), zBar: resample(t.zBar, grid) };
}
