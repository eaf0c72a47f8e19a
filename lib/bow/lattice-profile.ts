// Spectral radiance along ψ from per-drop kernels on the angle lattice (lib/bow/kernel-grid.ts):
// L_j(ψ, λ) = E_sun(λ) · s · [D ∗ Σ_i w_i β_j,i(·, λ)](ψ), with β_j,i the light one drop of radius r_i scatters
// per unit solid angle, D the sun disc's strip profile, s the path length (single scattering, van de Hulst 1957 §1.2).

import type { WavelengthGrid } from "../spectra/grid.js";
import { wavelengthsNm } from "../spectra/grid.js";
import { sunDiscKernel, type LimbDarkening } from "../sun/disc.js";
import { BLOCK_SAMPLES, latticeSpan, type LatticeSpan } from "./kernel-grid.js";

export interface SpectralProfile {
  anglesDeg: Float64Array;
  /** W m⁻² sr⁻¹ nm⁻¹, row-major: sample i, wavelength l at i·count + l; field perpendicular / parallel to the scattering plane. */
  perpendicular: Float64Array;
  parallel: Float64Array;
  mieTermAngles: number;
}

export interface OutputAngles {
  fromDeg: number;
  stepDeg: number;
  count: number;
}

/** The lattice points a profile needs: the output range widened by the disc's radius (and clipped at 0°, 180°). */
export function profileSpan(angles: OutputAngles, discDiameterDeg: number, h: number): LatticeSpan {
  const toDeg = angles.fromDeg + (angles.count - 1) * angles.stepDeg;
  return latticeSpan(Math.max(0, angles.fromDeg - discDiameterDeg / 2), Math.min(180, toDeg + discDiameterDeg / 2), h);
}

/**
 * Fills out (2n values, n = span.last − span.first + 1) with β⊥ then β∥ of the whole drop population at
 * wavelength l, m⁻¹ sr⁻¹: Σ_i w_i β_i over the radius quadrature.
 */
export type PopulationBeta = (wavelengthIndex: number, out: Float64Array) => void;

/** Σ_i w_i · row_i over lattice blocks into out (β⊥ then β∥ over the span). */
export function accumulateBlocks(
  span: LatticeSpan,
  blocks: readonly number[],
  weightsPerM3: Float64Array,
  row: (radiusIndex: number, block: number) => Float64Array,
  out: Float64Array,
): void {
  const n = span.last - span.first + 1;
  out.fill(0);
  for (const b of blocks) {
    const blockFirst = b * BLOCK_SAMPLES;
    for (let i = 0; i < weightsPerM3.length; i++) {
      const w = weightsPerM3[i];
      if (w === 0) continue;
      const r = row(i, b);
      const count = r.length / 2;
      const k0 = Math.max(0, span.first - blockFirst);
      const k1 = Math.min(count, span.last - blockFirst + 1);
      for (let k = k0; k < k1; k++) {
        const local = blockFirst + k - span.first;
        out[local] += w * r[k];
        out[n + local] += w * r[count + k];
      }
    }
  }
}

export interface LatticeProfileInput {
  angles: OutputAngles;
  grid: WavelengthGrid;
  span: LatticeSpan;
  beta: PopulationBeta;
  sunIrradiance: Float64Array;
  discDiameterDeg: number;
  limbDarkening: LimbDarkening;
  pathLengthM: number;
}

export function latticeProfile(input: LatticeProfileInput): SpectralProfile {
  const steps = latticeProfileSteps(input);
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
  }
}

/**
 * The same, one wavelength per step: a caller on an event loop can let other work run between steps
 * (the sum over drops is the bulk of a warm profile's time).
 */
export function* latticeProfileSteps(input: LatticeProfileInput): Generator<void, SpectralProfile> {
  const { angles, grid, span } = input;
  const { h, first, last } = span;
  const n = last - first + 1;
  const nl = grid.count;
  const wl = wavelengthsNm(grid);
  const anglesDeg = Float64Array.from({ length: angles.count }, (_, i) => angles.fromDeg + i * angles.stepDeg);
  const perpendicular = new Float64Array(angles.count * nl);
  const parallel = new Float64Array(angles.count * nl);
  const beta = new Float64Array(2 * n);
  const smoothed = new Float64Array(2 * n);

  for (let l = 0; l < nl; l++) {
    input.beta(l, beta);
    const disc = sunDiscKernel(input.discDiameterDeg, h, wl[l], input.limbDarkening);
    convolveOnLattice(beta, n, first, disc.weights, smoothed);
    const scale = input.sunIrradiance[l] * input.pathLengthM;
    for (let i = 0; i < angles.count; i++) {
      // Linear interpolation between lattice points (the lattice step is never coarser than the output step).
      const position = anglesDeg[i] / h - first;
      const k = Math.min(n - 2, Math.max(0, Math.floor(position)));
      const t = position - k;
      perpendicular[i * nl + l] = scale * (smoothed[k] * (1 - t) + smoothed[k + 1] * t);
      parallel[i * nl + l] = scale * (smoothed[n + k] * (1 - t) + smoothed[n + k + 1] * t);
    }
    yield;
  }
  return { anglesDeg, perpendicular, parallel, mieTermAngles: 0 };
}

/**
 * Convolves both halves of beta (⊥ then ∥, n points from lattice index `first`) with the disc's odd-length
 * kernel. Points before ψ = 0 mirror to |ψ| (the bow is a circle about the antisolar point); points past the
 * span's ends are left out and the weights renormalised.
 */
function convolveOnLattice(beta: Float64Array, n: number, first: number, weights: Float64Array, out: Float64Array): void {
  const half = (weights.length - 1) / 2;
  for (let part = 0; part < 2; part++) {
    const base = part * n;
    for (let k = 0; k < n; k++) {
      let sum = 0;
      let norm = 0;
      for (let t = 0; t < weights.length; t++) {
        let index = first + k + t - half;
        if (index < 0) index = -index;
        const local = index - first;
        if (local < 0 || local >= n) continue;
        sum += weights[t] * beta[base + local];
        norm += weights[t];
      }
      out[base + k] = norm > 0 ? sum / norm : 0;
    }
  }
}
