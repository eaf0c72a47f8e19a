// Spectral radiance along ψ from per-drop kernels on the angle lattice (lib/bow/kernel-grid.ts):
// L_j(ψ, λ) = E_sun(λ) · s · [D ∗ Σ_i w_i β_j,i(·, λ)](ψ), with β_j,i the light one drop of radius r_i scatters
// per unit solid angle, D the sun disc's strip profile, s the path length (single scattering, van de Hulst 1957 §1.2).

import { LRUCache } from "lru-cache";
import type { WavelengthGrid } from "../spectra/grid.js";
import { wavelengthsNm } from "../spectra/grid.js";
import { sunDiscKernel, type DiscKernel, type LimbDarkening } from "../sun/disc.js";
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

/**
 * Σ_i w_i · row_i over lattice blocks into out (β⊥ then β∥ over the span). Four rows at a time, added left to right
 * in radius order: the same sums, to the last bit, as one row at a time, with a quarter of the loads and stores of
 * `out` (the sum over drops is most of a warm profile's time).
 */
export function accumulateBlocks(
  span: LatticeSpan,
  blocks: readonly number[],
  weightsPerM3: Float64Array,
  row: (radiusIndex: number, block: number) => Float64Array,
  out: Float64Array,
): void {
  const n = span.last - span.first + 1;
  out.fill(0);
  const rows: Float64Array[] = [];
  const weights: number[] = [];
  for (const b of blocks) {
    const blockFirst = b * BLOCK_SAMPLES;
    rows.length = 0;
    weights.length = 0;
    for (let i = 0; i < weightsPerM3.length; i++) {
      if (weightsPerM3[i] === 0) continue;
      rows.push(row(i, b));
      weights.push(weightsPerM3[i]);
    }
    if (rows.length === 0) continue;
    // Every row of a block has the block's length.
    const count = rows[0].length / 2;
    const k0 = Math.max(0, span.first - blockFirst);
    const k1 = Math.min(count, span.last - blockFirst + 1);
    const shift = blockFirst - span.first;
    let j = 0;
    for (; j + 4 <= rows.length; j += 4) {
      const [r0, r1, r2, r3] = [rows[j], rows[j + 1], rows[j + 2], rows[j + 3]];
      const [w0, w1, w2, w3] = [weights[j], weights[j + 1], weights[j + 2], weights[j + 3]];
      for (let k = k0; k < k1; k++) {
        const local = shift + k;
        out[local] = out[local] + w0 * r0[k] + w1 * r1[k] + w2 * r2[k] + w3 * r3[k];
        const c = count + k;
        out[n + local] = out[n + local] + w0 * r0[c] + w1 * r1[c] + w2 * r2[c] + w3 * r3[c];
      }
    }
    for (; j < rows.length; j++) {
      const r = rows[j];
      const w = weights[j];
      for (let k = k0; k < k1; k++) {
        const local = shift + k;
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
  /** The sun disc's strip profile at wavelength index l (the same for every drop population: callers may share them). */
  disc: (wavelengthIndex: number) => DiscKernel;
  /** Indices (ascending) of the output angles wanted; all of them when left out. Each sample depends on its own neighbourhood only. */
  samples?: Int32Array;
}

/** The disc kernels of a grid, made once per wavelength on first use (they depend on the disc, the lattice step and λ only). */
export function discKernels(grid: WavelengthGrid, discDiameterDeg: number, h: number, limbDarkening: LimbDarkening): (wavelengthIndex: number) => DiscKernel {
  const wl = wavelengthsNm(grid);
  const made: DiscKernel[] = [];
  return (l) => (made[l] ??= sharedDiscKernel(discDiameterDeg, h, wl[l], limbDarkening));
}

/** Disc kernels already made, the DISC_KERNELS_KEPT used last (a warm profile would otherwise make its 41 again). */
const DISC_KERNELS_KEPT = 1024;
const discKernelsMade = new LRUCache<string, DiscKernel>({ max: DISC_KERNELS_KEPT });
function sharedDiscKernel(discDiameterDeg: number, h: number, wavelengthNm: number, limbDarkening: LimbDarkening): DiscKernel {
  const key = `${discDiameterDeg}|${h}|${wavelengthNm}|${limbDarkening}`;
  let kernel = discKernelsMade.get(key);
  if (!kernel) discKernelsMade.set(key, (kernel = sunDiscKernel(discDiameterDeg, h, wavelengthNm, limbDarkening)));
  return kernel;
}

/** The spectral radiance per unit sunlight and path, all at once (latticeUnitProfileSteps). */
export function latticeUnitProfile(input: LatticeProfileInput): SpectralProfile {
  const steps = latticeUnitProfileSteps(input);
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
  }
}

/**
 * [D ∗ Σ_i w_i β_i](ψ) per wavelength, i.e. L/(E_sun·s): the part of the profile that does not depend on the
 * sunlight, one wavelength per step, so that a caller on an event loop can let other work run between steps.
 * sunlitProfile turns it into radiance for one sun spectrum: the sun enters linearly, wavelength by wavelength,
 * so one such profile serves every sun elevation (time-of-day textures).
 */
export function* latticeUnitProfileSteps(input: LatticeProfileInput): Generator<void, SpectralProfile> {
  const pass = latticeUnitProfilePass(input);
  for (let l = 0; l < input.grid.count; l++) {
    pass.add(l, (out) => input.beta(l, out));
    yield;
  }
  return pass.result();
}

/** A unit profile filled one wavelength at a time, in any order (each wavelength's column depends on its β alone). */
export interface LatticeUnitProfilePass {
  /** Sums wavelength l from its population β (filled into out as PopulationBeta does); again: the same column again. */
  add(wavelengthIndex: number, beta: (out: Float64Array) => void): void;
  /** Whether wavelength l has been added. */
  has(wavelengthIndex: number): boolean;
  /** The profile (columns of wavelengths never added are zero). */
  result(): SpectralProfile;
}

/** latticeUnitProfileSteps' work as a pass that takes the wavelengths as their β become known (kernel rows arriving). */
export function latticeUnitProfilePass(input: Omit<LatticeProfileInput, "beta">): LatticeUnitProfilePass {
  const { angles, grid, span } = input;
  const { h, first, last } = span;
  const n = last - first + 1;
  const nl = grid.count;
  const wanted = input.samples ?? Int32Array.from({ length: angles.count }, (_, i) => i);
  const count = wanted.length;
  const anglesDeg = Float64Array.from(wanted, (i) => angles.fromDeg + i * angles.stepDeg);
  // Linear interpolation between lattice points (the lattice step is never coarser than the output step): each
  // output angle reads lattice points k and k + 1, the only ones the disc's convolution needs to fill.
  const lower = new Int32Array(count);
  const fraction = new Float64Array(count);
  const needed = new Uint8Array(n);
  for (let s = 0; s < count; s++) {
    const position = anglesDeg[s] / h - first;
    const k = Math.min(n - 2, Math.max(0, Math.floor(position)));
    lower[s] = k;
    fraction[s] = position - k;
    needed[k] = 1;
    needed[k + 1] = 1;
  }
  const perpendicular = new Float64Array(count * nl);
  const parallel = new Float64Array(count * nl);
  const beta = new Float64Array(2 * n);
  const smoothed = new Float64Array(2 * n);
  const added = new Uint8Array(nl);
  return {
    add(l, fill) {
      fill(beta);
      convolveOnLattice(beta, n, first, input.disc(l).weights, needed, smoothed);
      for (let s = 0; s < count; s++) {
        const k = lower[s];
        const t = fraction[s];
        perpendicular[s * nl + l] = smoothed[k] * (1 - t) + smoothed[k + 1] * t;
        parallel[s * nl + l] = smoothed[n + k] * (1 - t) + smoothed[n + k + 1] * t;
      }
      added[l] = 1;
    },
    has: (l) => added[l] === 1,
    result: () => ({ anglesDeg, perpendicular, parallel, mieTermAngles: 0 }),
  };
}

/** L = E_sun(λ)·s·unit (van de Hulst 1957 §1.2, single scattering): the unit profile lit by one sun spectrum. */
export function sunlitProfile(unit: SpectralProfile, sunIrradiance: Float64Array, pathLengthM: number): SpectralProfile {
  const nl = sunIrradiance.length;
  const scale = Float64Array.from(sunIrradiance, (e) => e * pathLengthM);
  const perpendicular = new Float64Array(unit.perpendicular.length);
  const parallel = new Float64Array(unit.parallel.length);
  for (let o = 0; o < perpendicular.length; o += nl) {
    for (let l = 0; l < nl; l++) {
      perpendicular[o + l] = scale[l] * unit.perpendicular[o + l];
      parallel[o + l] = scale[l] * unit.parallel[o + l];
    }
  }
  return { anglesDeg: unit.anglesDeg, perpendicular, parallel, mieTermAngles: unit.mieTermAngles };
}

/** The unit profile seen through a polariser (Malus weights cos2, sin2; both 1 without one): cos2·⊥ + sin2·∥. */
export function polarisedUnitRadiance(unit: SpectralProfile, cos2: number, sin2: number): Float64Array {
  const { perpendicular, parallel } = unit;
  const out = new Float64Array(perpendicular.length);
  for (let k = 0; k < out.length; k++) out[k] = cos2 * perpendicular[k] + sin2 * parallel[k];
  return out;
}

/**
 * Convolves both halves of beta (⊥ then ∥, n points from lattice index `first`) with the disc's odd-length
 * kernel, at the lattice points marked needed. Points before ψ = 0 mirror to |ψ| (the bow is a circle about the
 * antisolar point); points past the span's ends are left out and the weights renormalised.
 */
function convolveOnLattice(beta: Float64Array, n: number, first: number, weights: Float64Array, needed: Uint8Array, out: Float64Array): void {
  const half = (weights.length - 1) / 2;
  // Inside [kLo, kHi] every tap falls within the span at a non-negative index: no mirror, no clipping, and the
  // weights' sum (added in the same order as at the edges) is the norm.
  const kLo = Math.max(half, half - first);
  const kHi = n - 1 - half;
  let fullNorm = 0;
  for (let t = 0; t < weights.length; t++) fullNorm += weights[t];
  for (let part = 0; part < 2; part++) {
    const base = part * n;
    for (let k = 0; k < n; k++) {
      if (!needed[k]) continue;
      if (k >= kLo && k <= kHi) {
        let sum = 0;
        const from = base + k - half;
        for (let t = 0; t < weights.length; t++) sum += weights[t] * beta[from + t];
        out[base + k] = fullNorm > 0 ? sum / fullNorm : 0;
        continue;
      }
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
