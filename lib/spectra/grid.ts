/** A regular wavelength grid: count = round((toNm − fromNm)/stepNm) + 1 samples, both ends included. */
export interface WavelengthGrid {
  readonly fromNm: number;
  readonly toNm: number;
  readonly stepNm: number;
  readonly count: number;
}

export function makeWavelengthGrid(fromNm: number, toNm: number, stepNm: number): WavelengthGrid {
  if (!(Number.isFinite(fromNm) && Number.isFinite(toNm) && stepNm > 0 && toNm >= fromNm)) {
    throw new RangeError(`invalid wavelength grid ${fromNm}..${toNm} step ${stepNm} nm`);
  }
  const intervals = (toNm - fromNm) / stepNm;
  const rounded = Math.round(intervals);
  // Both ends must lie on the grid: a grid that silently drops its end would bias integrals.
  if (Math.abs(intervals - rounded) > 1e-9 * Math.max(1, rounded)) {
    throw new RangeError(`wavelength range ${fromNm}..${toNm} nm is not a whole number of ${stepNm} nm steps`);
  }
  return { fromNm, toNm, stepNm, count: rounded + 1 };
}

export function wavelengthsNm(grid: WavelengthGrid): Float64Array {
  const out = new Float64Array(grid.count);
  for (let i = 0; i < grid.count; i++) out[i] = grid.fromNm + i * grid.stepNm;
  return out;
}

export function sameGrid(a: WavelengthGrid, b: WavelengthGrid): boolean {
  return a.count === b.count && a.fromNm === b.fromNm && a.stepNm === b.stepNm;
}
