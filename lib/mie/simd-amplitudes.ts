// S1, S2 by the WebAssembly SIMD angle loop (lib/mie/wasm/amplitudes.wat): the formulas and operation order of
// mieAmplitudesScalar (lib/mie/amplitudes.ts), two angles per f64x2 vector; in exact arithmetic the same sums to the
// bit, fused (relaxed SIMD, lib/mie/wasm/load.ts) within rounding of them. Null where WebAssembly SIMD is missing.

import { wasmModules } from "./wasm/modules.generated.js";
import { instantiateKernel, preferredArithmetic, type WasmArithmetic } from "./wasm/load.js";
import { amplitudeFromLanes } from "./wasm/lane-sums.js";
import { packCoefficients, PACKED_STRIDE } from "./packed-coefficients.js";
import type { MieAmplitudes, MieCoefficients } from "./types.js";

/** Angle pairs (f64x2 vectors) per group: 5 (10 angles) π recurrences in flight in the fill phase (measured: amplitudes.wat). */
const SIMD_PAIRS_PER_GROUP = wasmModules.amplitudes.constants.PAIRS;
/** Orders per chunk: the table of π_n ± τ_n the fill phase writes for the sums holds this many orders. */
const CHUNK_ORDERS = wasmModules.amplitudes.constants.CHUNK;
/** f64 values of the table per order and angle pair: π + τ and π − τ, two lanes each. */
const TABLE_PER_PAIR = 4;
/** f64 values written per angle pair: Σ w(a+b)(π+τ) re, im and Σ w(a−b)(π−τ) re, im, two lanes each. */
const SIMD_OUT_PER_PAIR = 8;
const PAGE_BYTES = 65536;
const ANGLES_PER_GROUP = 2 * SIMD_PAIRS_PER_GROUP;

interface Kernel {
  run(coefficients: number, nTerms: number, cosines: number, groups: number, out: number, table: number): void;
  memory: WebAssembly.Memory;
}

export type SimdAmplitudes = (c: MieCoefficients, cosTheta: Float64Array, res: MieAmplitudes) => MieAmplitudes | null;

/** The kernel in the given arithmetic, or null where this runtime cannot run it. */
export function createSimdAmplitudes(arithmetic: WasmArithmetic): SimdAmplitudes | null {
  const exports = instantiateKernel("amplitudes", arithmetic);
  if (exports === null) return null;
  const { amplitudes, memory } = exports as { amplitudes: Kernel["run"]; memory: WebAssembly.Memory };
  const kernel: Kernel = { run: amplitudes, memory };
  return (c, cosTheta, res) => run(kernel, c, cosTheta, res);
}

/** The arithmetic mieAmplitudesSimd uses here: fused where relaxed SIMD is offered, else exact. */
export const simdArithmetic: WasmArithmetic = preferredArithmetic();
const preferred = createSimdAmplitudes(simdArithmetic);

/** Whether the WebAssembly kernel runs here (Node ≥ 16.4 has fixed-width SIMD on by default). */
export const simdAmplitudesAvailable = preferred !== null;

/** As mieAmplitudesScalar, or null when WebAssembly SIMD is unavailable. */
export function mieAmplitudesSimd(c: MieCoefficients, cosTheta: Float64Array, res: MieAmplitudes): MieAmplitudes | null {
  return preferred === null ? null : preferred(c, cosTheta, res);
}

function run(kernel: Kernel, c: MieCoefficients, cosTheta: Float64Array, res: MieAmplitudes): MieAmplitudes | null {
  if (c.nTerms < 1) return null;
  const nAngles = cosTheta.length;
  const groups = Math.ceil(nAngles / ANGLES_PER_GROUP);
  const padded = groups * ANGLES_PER_GROUP;
  // Layout (f64 indices): coefficients, cosines (padded with μ = 0), the π ± τ table of one chunk, sums.
  const cosAt = c.nTerms * PACKED_STRIDE;
  const tableAt = cosAt + padded;
  const outAt = tableAt + CHUNK_ORDERS * SIMD_PAIRS_PER_GROUP * TABLE_PER_PAIR;
  const bytes = 8 * (outAt + (padded / 2) * SIMD_OUT_PER_PAIR);
  const have = kernel.memory.buffer.byteLength;
  if (have < bytes) kernel.memory.grow(Math.ceil((bytes - have) / PAGE_BYTES));
  const m = new Float64Array(kernel.memory.buffer);
  packCoefficients(c, m, 0);
  m.set(cosTheta, cosAt);
  m.fill(0, cosAt + nAngles, tableAt);
  // One group per call: V8 first runs WebAssembly from baseline code (measured ~50× slower here) and swaps in the
  // optimised code between calls, never inside one, so short calls pick it up as soon as it is ready.
  const outGroupBytes = 8 * SIMD_OUT_PER_PAIR * SIMD_PAIRS_PER_GROUP;
  for (let g = 0; g < groups; g++) kernel.run(0, c.nTerms, 8 * cosAt + 8 * ANGLES_PER_GROUP * g, 1, 8 * outAt + outGroupBytes * g, 8 * tableAt);
  // Angle j is lane j & 1 of pair j >> 1.
  for (let j = 0; j < nAngles; j++) amplitudeFromLanes(m, outAt + (j >> 1) * SIMD_OUT_PER_PAIR + (j & 1), res, j);
  return res;
}
