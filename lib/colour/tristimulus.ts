import type { WavelengthGrid } from "../spectra/grid.js";
import type { Spectrum } from "../spectra/spectrum.js";
import { type Observer, colourMatchingFunctions } from "./observers.js";

/** CIE tristimulus values of one stimulus (unnormalised: k = 1). */
export interface Xyz {
  readonly X: number;
  readonly Y: number;
  readonly Z: number;
}

export interface Chromaticity {
  readonly x: number;
  readonly y: number;
}

/** X = Σ S(λ) x̄(λ) Δλ, likewise Y, Z (CIE 015:2018 §7.1, Eq. 7.1 with k = 1; the caller normalises). */
export function spectrumToXyz(spectrum: Spectrum, observer: Observer): Xyz {
  const cmf = colourMatchingFunctions(observer, spectrum.grid);
  const s = spectrum.values;
  let X = 0;
  let Y = 0;
  let Z = 0;
  for (let i = 0; i < s.length; i++) {
    X += s[i] * cmf.xBar.values[i];
    Y += s[i] * cmf.yBar.values[i];
    Z += s[i] * cmf.zBar.values[i];
  }
  const d = spectrum.grid.stepNm;
  return { X: X * d, Y: Y * d, Z: Z * d };
}

/**
 * Many spectra sharing one grid, stored row-major (sample s, wavelength i at s·count + i),
 * to interleaved XYZ (3 per sample), by the same CIE 015:2018 Eq. 7.1 sum.
 */
export function spectraToXyz(grid: WavelengthGrid, spectra: Float64Array, observer: Observer): Float64Array {
  const n = grid.count;
  if (spectra.length % n !== 0) throw new RangeError(`spectra length ${spectra.length} is not a multiple of ${n}`);
  const cmf = colourMatchingFunctions(observer, grid);
  return weightedSums(spectra, [cmf.xBar.values, cmf.yBar.values, cmf.zBar.values], grid.stepNm);
}

/** Interleaved (Σ v·wx, Σ v·wy, Σ v·wz)·factor of spectra stored row-major (sample s, entry i at s·count + i). */
export function weightedSums(spectra: Float64Array, weights: readonly ArrayLike<number>[], factor: number): Float64Array {
  const [xb, yb, zb] = weights;
  const n = xb.length;
  const samples = spectra.length / n;
  const out = new Float64Array(3 * samples);
  for (let s = 0; s < samples; s++) {
    let X = 0;
    let Y = 0;
    let Z = 0;
    const base = s * n;
    for (let i = 0; i < n; i++) {
      const v = spectra[base + i];
      X += v * xb[i];
      Y += v * yb[i];
      Z += v * zb[i];
    }
    out[3 * s] = X * factor;
    out[3 * s + 1] = Y * factor;
    out[3 * s + 2] = Z * factor;
  }
  return out;
}

/**
 * 1/v for a luminance used as a scale; 0 for no light, and also for a subnormal v whose reciprocal overflows float64
 * (such light, ~1e-308 of a unit, is black at any exposure; scaling by Infinity would only make NaN).
 */
export function luminanceReciprocal(v: number): number {
  const r = 1 / v;
  return v > 0 && Number.isFinite(r) ? r : 0;
}

/** x = X/(X+Y+Z), y = Y/(X+Y+Z) (CIE 015:2018 §7.3, Eq. 7.3); black gives NaN. */
export function chromaticity(xyz: Xyz): Chromaticity {
  const sum = xyz.X + xyz.Y + xyz.Z;
  return { x: xyz.X / sum, y: xyz.Y / sum };
}

/** Chromaticities of interleaved XYZ samples, interleaved x, y. */
export function chromaticities(xyz: Float64Array): Float64Array {
  const n = xyz.length / 3;
  const out = new Float64Array(2 * n);
  for (let s = 0; s < n; s++) {
    const sum = xyz[3 * s] + xyz[3 * s + 1] + xyz[3 * s + 2];
    out[2 * s] = xyz[3 * s] / sum;
    out[2 * s + 1] = xyz[3 * s + 1] / sum;
  }
  return out;
}
