// Spectral radiance of a bow along ψ, the angle from the antisolar point: a thin curtain of drops in single
// scattering gives L_j(ψ, λ) = E_sun(λ) · β_j(180° − ψ, λ) · s (van de Hulst 1957 §1.2; s the path length
// through the rain), then smeared by the sun's disc (convolution with its limb-darkened strip profile).

import type { WavelengthGrid } from "../spectra/grid.js";
import { wavelengthsNm } from "../spectra/grid.js";
import { convolveProfile, sunDiscKernel, type LimbDarkening } from "../sun/disc.js";
import { volumeScattering, type DropEngine } from "./volume-scattering.js";

/**
 * Finest internal angle step. The sun's disc (0.53°) is resolved by ≥ 10 taps and Airy bins are exact at any
 * step; the convergence test (test/bow-profile.test.ts) measures that halving it changes no colour by ΔE ≥ 1.
 */
export const MAX_INTERNAL_STEP_DEG = 0.05;

export interface SpectralProfileInput {
  /** Output ψ samples: fromDeg + i·stepDeg, i < count. */
  fromDeg: number;
  stepDeg: number;
  count: number;
  grid: WavelengthGrid;
  /** Per wavelength: drop index relative to air (re, im) and air's index. */
  mRe: Float64Array;
  mIm: Float64Array;
  nAir: Float64Array;
  radiiUm: Float64Array;
  weightsPerM3: Float64Array;
  engineForRadius: (radiusUm: number) => DropEngine;
  /** Direct sunlight on the curtain, W m⁻² nm⁻¹, per wavelength. */
  sunIrradiance: Float64Array;
  discDiameterDeg: number;
  limbDarkening: LimbDarkening;
  pathLengthM: number;
  /** Finest internal angle step, degrees; MAX_INTERNAL_STEP_DEG unless a convergence study asks for finer. */
  maxInternalStepDeg?: number;
}

export interface SpectralProfile {
  anglesDeg: Float64Array;
  /** W m⁻² sr⁻¹ nm⁻¹, row-major: sample i, wavelength l at i·count + l; field perpendicular / parallel to the scattering plane. */
  perpendicular: Float64Array;
  parallel: Float64Array;
  mieTermAngles: number;
}

export interface InternalGrid {
  /** Internal samples per output step, the internal step (degrees), and the padding for the disc on each side. */
  refine: number;
  h: number;
  pad: number;
  internalCount: number;
}

export function internalGrid(
  stepDeg: number,
  count: number,
  discDiameterDeg: number,
  maxInternalStepDeg = MAX_INTERNAL_STEP_DEG,
): InternalGrid {
  const refine = Math.max(1, Math.ceil(stepDeg / maxInternalStepDeg - 1e-9));
  const h = stepDeg / refine;
  const pad = Math.ceil(discDiameterDeg / 2 / h) + 1;
  return { refine, h, pad, internalCount: (count - 1) * refine + 1 + 2 * pad };
}

export function spectralProfile(input: SpectralProfileInput): SpectralProfile {
  const { fromDeg, stepDeg, count, grid } = input;
  const { refine, h, pad, internalCount } = internalGrid(stepDeg, count, input.discDiameterDeg, input.maxInternalStepDeg);
  const psiLo = fromDeg - pad * h;
  const psiHi = psiLo + (internalCount - 1) * h;

  // Θ ascending over the ψ ≥ 0 part; ψ < 0 (the disc reaching past the antisolar point) mirrors to |ψ|.
  const positiveCount = psiLo >= 0 ? internalCount : internalCount - Math.ceil(-psiLo / h - 1e-9);
  const thetaDeg = new Float64Array(positiveCount);
  for (let j = 0; j < positiveCount; j++) thetaDeg[j] = 180 - psiHi + j * h;
  const wl = wavelengthsNm(grid);
  const beta = volumeScattering({
    radiiUm: input.radiiUm,
    weightsPerM3: input.weightsPerM3,
    wavelengthsNm: wl,
    mRe: input.mRe,
    mIm: input.mIm,
    nAir: input.nAir,
    thetaDeg,
    stepDeg: h,
    engineForRadius: input.engineForRadius,
  });

  const anglesDeg = new Float64Array(count);
  for (let i = 0; i < count; i++) anglesDeg[i] = fromDeg + i * stepDeg;
  const nl = grid.count;
  const perpendicular = new Float64Array(count * nl);
  const parallel = new Float64Array(count * nl);
  const row = new Float64Array(internalCount);
  for (let l = 0; l < nl; l++) {
    const kernel = sunDiscKernel(input.discDiameterDeg, h, wl[l], input.limbDarkening);
    const scale = input.sunIrradiance[l] * input.pathLengthM;
    for (const [source, target] of [
      [beta.perpendicular, perpendicular],
      [beta.parallel, parallel],
    ] as const) {
      const base = l * positiveCount;
      for (let k = 0; k < internalCount; k++) {
        const psi = psiLo + k * h;
        row[k] = psi >= 0 ? source[base + internalCount - 1 - k] : valueAtPsi(source, base, positiveCount, psiHi, h, -psi);
      }
      const smoothed = convolveProfile(row, kernel);
      for (let i = 0; i < count; i++) target[i * nl + l] = scale * smoothed[pad + i * refine];
    }
  }
  return { anglesDeg, perpendicular, parallel, mieTermAngles: beta.mieTermAngles };
}

/** β at a ψ between grid points (only for the mirrored ψ < 0 part), by linear interpolation. */
function valueAtPsi(source: Float64Array, base: number, n: number, psiHi: number, h: number, psi: number): number {
  const position = (180 - psi - (180 - psiHi)) / h;
  const j = Math.min(n - 2, Math.max(0, Math.floor(position)));
  const t = Math.min(1, Math.max(0, position - j));
  return source[base + j] * (1 - t) + source[base + j + 1] * t;
}
