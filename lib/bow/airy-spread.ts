// The wave structure of a bow restored to its ray-optical row: each ray's light spread over Θ by an Airy kernel.
// Near a fold the exit wavefront is cubic, and the Wigner function of a cubic wavefront is an Airy function of the
// distance to the ray's direction (Berry 1977, Phil. Trans. R. Soc. A 287, 237, §4; from memory): integrated over the
// pupil, ∫ Ai(2^{2/3}(X + t²)) dt = π·2^{1/3}·Ai²(X) (from the Fourier form of Ai, DLMF 9.5.4; checked by quadrature in
// test/lib/bow/airy-spread.test.ts), so a fold's rays, each spread by (1/σ)·Ai(∓(Θ − Θ_ray)/σ) with
// σ = 1/(2^{2/3}·κ·x^{2/3}), add up to Airy's bow |S|² ∝ Ai²(−ξ), ξ = κ·x^{2/3}·(Θ − Θ_R) (lib/rays/airy-bow.ts), with
// its amplitude, its supernumerary bands and its light on the dark side; far from the fold the kernel, of unit
// integral, leaves the rays' light where it was. The spread is linear, so it commutes with the canting mean: a
// mean of ray-optical rows spread once is the mean of the spread rows, provided σ is alike for the tilts that matter.

import { airyAi } from "../special/airy.js";
import { airyBowScale } from "../rays/airy-bow.js";

const DEG = Math.PI / 180;
/**
 * The kernel reaches this many σ into the bow's lit side, its last third tapered by a raised cosine and the whole
 * scaled to unit sum. Measured on a sphere's fold binned at 2.4 and 1.2 σ per bin (1 mm and 3 mm drops' primary on
 * 0.05° bins) against Airy's bow, after the sun's disc: worst 0.016 / 0.008 of the peak at 10σ, 0.005–0.007 at 20σ,
 * no better at 30σ or 50σ (issue 13's notes); the ray-optical row itself is 0.11 / 0.05 off there.
 */
export const AIRY_SPREAD_LIT_SIGMAS = 20;
const AIRY_SPREAD_TAPER = 0.3;
/** On the dark side: Ai(8) ≈ 5e-8, 1e-7 of Ai's peak (A&S 10.4.59's leading term), the rest is nothing. */
const AIRY_SPREAD_DARK_SIGMAS = 8;
/** Samples of the kernel per bin, weighted by the triangle that averages a bin's spread over the bins. */
const SAMPLES_PER_BIN = 32;

/** The Airy width σ (degrees) and the lit side (+1: Θ > Θ_R, the primary; −1: the secondary) of a fold. */
export interface FoldWidth {
  sigmaDeg: number;
  litSide: 1 | -1;
}

/** The fold width of a bow whose ξ per radian is κ·x^{2/3} (lib/rays/airy-bow.ts; lib/bow/plane-bow-table.ts's κ). */
export function foldWidth(kappa: number, x: number, litSide: 1 | -1): FoldWidth {
  return { sigmaDeg: 1 / (2 ** (2 / 3) * kappa * x ** (2 / 3)) / DEG, litSide };
}

/** A fold's κ (ξ per radian over x^{2/3}) and its lit side. */
export interface FoldKappa {
  kappa: number;
  litSide: 1 | -1;
}

/** κ of the bow after `internalReflections` reflections (1: primary, 2: secondary) of a sphere at real index n. */
export function sphereFoldKappa(n: number, internalReflections: number): FoldKappa {
  const scale = airyBowScale(n, 1, internalReflections);
  return { kappa: Math.abs(scale.xiPerRad), litSide: scale.xiPerRad > 0 ? 1 : -1 };
}

/** Weights of the bins from `first` on (offsets from a ray's bin) that a unit of light in one bin spreads to. */
export interface AirySpreadKernel {
  first: number;
  weights: Float64Array;
}

/**
 * The kernel for a fold of width sigmaBins (σ in bins): (1/σ)·Ai(−litSide·z/σ) at offset z, averaged over a source bin
 * and a target bin (the triangle of half-width one bin), its lit side tapered, scaled to unit sum (the spread keeps
 * the power).
 */
export function airySpreadKernel(sigmaBins: number, litSide: 1 | -1): AirySpreadKernel {
  const { reachLit, reachDark } = airySpreadKernelShape(sigmaBins);
  const taperFrom = AIRY_SPREAD_LIT_SIGMAS * (1 - AIRY_SPREAD_TAPER);
  const weights = new Float64Array(reachLit + reachDark + 1);
  let sum = 0;
  for (let m = -reachDark; m <= reachLit; m++) {
    let value = 0;
    for (let q = 0; q < 2 * SAMPLES_PER_BIN; q++) {
      const z = -1 + (q + 0.5) / SAMPLES_PER_BIN;
      const u = (m + z) / sigmaBins;
      const taper = u <= taperFrom ? 1 : u >= AIRY_SPREAD_LIT_SIGMAS ? 0 : 0.5 * (1 + Math.cos((Math.PI * (u - taperFrom)) / (AIRY_SPREAD_LIT_SIGMAS - taperFrom)));
      value += (1 - Math.abs(z)) * airyAi(-u) * taper;
    }
    weights[m + reachDark] = value;
    sum += value;
  }
  for (let i = 0; i < weights.length; i++) weights[i] /= sum;
  // The lit side towards higher bins: mirrored for a fold lit below.
  if (litSide === -1) weights.reverse();
  return { first: litSide === 1 ? -reachDark : -reachLit, weights };
}

/** How many bins the kernel of a fold sigmaBins wide reaches into its lit and dark sides. */
export function airySpreadKernelShape(sigmaBins: number): { reachLit: number; reachDark: number } {
  return { reachLit: Math.ceil(AIRY_SPREAD_LIT_SIGMAS * sigmaBins) + 1, reachDark: Math.ceil(AIRY_SPREAD_DARK_SIGMAS * sigmaBins) + 1 };
}

/** How many bins a kernel reaches on either side of its ray's bin at most. */
export function kernelReach(shape: { reachLit: number; reachDark: number }): number {
  return Math.max(shape.reachLit, shape.reachDark);
}

/**
 * Adds source spread by the kernel to target, whose bin 0 is source's bin `offset` (source[i] lands on
 * target[i − offset + first + m] with weights[m]; what falls outside target is dropped).
 */
export function spreadWithAiry(source: Float64Array, kernel: AirySpreadKernel, target: Float64Array, offset = 0): void {
  const { first, weights } = kernel;
  const n = target.length;
  for (let i = 0; i < source.length; i++) {
    const value = source[i];
    if (value === 0) continue;
    const at = i - offset + first;
    const from = Math.max(0, -at);
    const to = Math.min(weights.length, n - at);
    for (let m = from; m < to; m++) target[at + m] += value * weights[m];
  }
}
