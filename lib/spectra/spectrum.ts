import { type WavelengthGrid, sameGrid, wavelengthsNm } from "./grid.js";

/** Spectral values sampled on a grid; the grid travels with the values. */
export interface Spectrum {
  readonly grid: WavelengthGrid;
  readonly values: Float64Array;
}

/** A tabulated function of wavelength, ascending and possibly irregular (e.g. ASTM G173, a user's table). */
export interface TabulatedSpectrum {
  readonly wavelengthsNm: Float64Array;
  readonly values: Float64Array;
}

export function makeSpectrum(grid: WavelengthGrid, values: Float64Array): Spectrum {
  if (values.length !== grid.count) throw new RangeError(`spectrum has ${values.length} values for a grid of ${grid.count}`);
  return { grid, values };
}

export function tabulated(wavelengthsNmIn: ArrayLike<number>, valuesIn: ArrayLike<number>): TabulatedSpectrum {
  const w = Float64Array.from(wavelengthsNmIn);
  const v = Float64Array.from(valuesIn);
  if (w.length !== v.length || w.length < 2) throw new RangeError("a table needs at least 2 rows and equal column lengths");
  for (let i = 0; i < w.length; i++) {
    if (!Number.isFinite(w[i]) || (i > 0 && !(w[i] > w[i - 1]))) throw new RangeError("table wavelengths must be finite and strictly ascending");
  }
  return { wavelengthsNm: w, values: v };
}

export function regularTable(startNm: number, stepNm: number, values: Float64Array): TabulatedSpectrum {
  const w = new Float64Array(values.length);
  for (let i = 0; i < w.length; i++) w[i] = startNm + i * stepNm;
  return { wavelengthsNm: w, values };
}

/** Largest i with x[i] <= value (x ascending); caller guarantees x[0] <= value <= x[last]. */
export function bracket(x: Float64Array, value: number): number {
  let lo = 0;
  let hi = x.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x[mid] <= value) lo = mid;
    else hi = mid;
  }
  return lo;
}

/** Linear interpolation of a table at one wavelength; throws outside the table (no extrapolation). */
export function interpolateAt(table: TabulatedSpectrum, wavelengthNm: number): number {
  const x = table.wavelengthsNm;
  const n = x.length;
  const tol = 1e-9;
  if (!(wavelengthNm >= x[0] - tol && wavelengthNm <= x[n - 1] + tol)) {
    throw new RangeError(`${wavelengthNm} nm lies outside the table (${x[0]}–${x[n - 1]} nm)`);
  }
  const w = Math.min(Math.max(wavelengthNm, x[0]), x[n - 1]);
  const i = Math.min(bracket(x, w), n - 2);
  const t = (w - x[i]) / (x[i + 1] - x[i]);
  return table.values[i] + t * (table.values[i + 1] - table.values[i]);
}

/** Resample a table onto a grid by linear interpolation; the grid must lie inside the table's range. */
export function resample(table: TabulatedSpectrum, grid: WavelengthGrid): Spectrum {
  const w = wavelengthsNm(grid);
  const values = new Float64Array(grid.count);
  for (let i = 0; i < w.length; i++) values[i] = interpolateAt(table, w[i]);
  return { grid, values };
}

function requireSameGrid(a: Spectrum, b: Spectrum): void {
  if (!sameGrid(a.grid, b.grid)) throw new RangeError("spectra on different wavelength grids; resample first");
}

export function multiplySpectra(a: Spectrum, b: Spectrum): Spectrum {
  requireSameGrid(a, b);
  const values = new Float64Array(a.values.length);
  for (let i = 0; i < values.length; i++) values[i] = a.values[i] * b.values[i];
  return { grid: a.grid, values };
}

export function scaleSpectrum(a: Spectrum, factor: number): Spectrum {
  return { grid: a.grid, values: a.values.map((v) => v * factor) };
}
