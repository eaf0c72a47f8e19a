// S1, S2 of many drops on one angle grid by the WebAssembly kernel lib/mie/wasm/many-drops.wat: π_n ± τ_n once per
// block of 4 angles and chunk of orders, every drop's sums from that table. The same sums as mieAmplitudes drop by
// drop, to the bit (same operations in the same order per drop and angle); falls back to mieAmplitudes per drop
// where WebAssembly SIMD is missing.

import { wasmModules } from "./wasm/modules.generated.js";
import { packCoefficients, PACKED_STRIDE } from "./packed-coefficients.js";
import { mieAmplitudes } from "./amplitudes.js";
import { instantiateKernel, preferredArithmetic, type WasmArithmetic } from "./wasm/load.js";
import { amplitudeFromLanes } from "./wasm/lane-sums.js";
import type { MieAmplitudes, MieCoefficients } from "./types.js";

interface Kernel {
  run(orders: number, nMax: number, drops: number, nDrops: number, cosines: number, nBlocks: number, state: number, table: number, sums: number): void;
  memory: WebAssembly.Memory;
}

const PAGE_BYTES = 65536;
const ANGLES_PER_BLOCK = 4;
const CHUNK = wasmModules["many-drops"].constants.CHUNK;
/**
 * Blocks of angles per call: each drop's chunk of coefficients serves them all while it is in the first-level cache,
 * so a task's coefficients (up to 24 MiB) are read from memory once per BLOCKS blocks rather than once per block.
 */
const BLOCKS = wasmModules["many-drops"].constants.BLOCKS;
/** f64 values per block where the kernel keeps μ, π_{n−1}, π_n of its 2 vectors between chunks. */
const RECURRENCE_STATE = 12;
/** f64 values per drop and block of sums: Σ w(a+b)(π+τ) re, im, Σ w(a−b)(π−τ) re, im, 2 vectors of 2 lanes. */
const SUMS_PER_BLOCK = 16;
/**
 * Partial waves (summed over drops) packed per pass: 2^19 × 48 bytes = 24 MiB of WebAssembly memory per thread at
 * most, which the thread keeps (WebAssembly memory does not shrink); a pass with more drops would share the table
 * among more of them but the largest drops alone fill it.
 */
export const MANY_DROPS_MAX_TERMS = 2 ** 19;

export type ManyDropsAmplitudes = (count: number, coefficientsOf: (d: number) => MieCoefficients, cosTheta: Float64Array, outs: MieAmplitudes[]) => void;

/** The kernel in the given arithmetic, or null where this runtime cannot run it. */
export function createManyDrops(arithmetic: WasmArithmetic): ManyDropsAmplitudes | null {
  const exports = instantiateKernel("many-drops", arithmetic);
  if (exports === null) return null;
  const { manyDrops, memory } = exports as { manyDrops: Kernel["run"]; memory: WebAssembly.Memory };
  const kernel: Kernel = { run: manyDrops, memory };
  return (count, coefficientsOf, cosTheta, outs) => runManyDrops(kernel, count, coefficientsOf, cosTheta, outs);
}

// The same arithmetic as mieAmplitudes' kernel (simd-amplitudes.ts), so both give the same sums.
const preferred = createManyDrops(preferredArithmetic());

/** Whether the many-drops kernel runs here. */
export const manyDropsAvailable = preferred !== null;

/**
 * S1, S2 (Bohren & Huffman 1983 convention) of `count` drops at each μ = cos Θ into outs[d]. coefficientsOf(d)
 * gives drop d's a_n, b_n; its result is packed at once, so it may be a scratch buffer reused from call to call.
 * The same values as mieAmplitudes drop by drop, which it falls back to where WebAssembly SIMD is missing.
 */
export function mieAmplitudesManyDrops(count: number, coefficientsOf: (d: number) => MieCoefficients, cosTheta: Float64Array, outs: MieAmplitudes[]): void {
  if (preferred === null) {
    for (let d = 0; d < count; d++) mieAmplitudes(coefficientsOf(d), cosTheta, outs[d]);
    return;
  }
  preferred(count, coefficientsOf, cosTheta, outs);
}

function runManyDrops(kernel: Kernel, count: number, coefficientsOf: (d: number) => MieCoefficients, cosTheta: Float64Array, outs: MieAmplitudes[]): void {
  let batch: { drop: number; at: number; nTerms: number }[] = [];
  let words = 0;
  let m = new Float64Array(kernel.memory.buffer);
  const reserve = (bytes: number) => {
    const have = kernel.memory.buffer.byteLength;
    if (have < bytes) kernel.memory.grow(Math.ceil((bytes - have) / PAGE_BYTES));
    if (m.buffer !== kernel.memory.buffer) m = new Float64Array(kernel.memory.buffer);
  };
  for (let d = 0; d < count; d++) {
    const c = coefficientsOf(d);
    if (c.nTerms < 1) throw new RangeError("a drop needs at least one partial wave");
    if (batch.length > 0 && (words + c.nTerms * PACKED_STRIDE) / PACKED_STRIDE > MANY_DROPS_MAX_TERMS) {
      runBatch(kernel, batch, words, cosTheta, outs, reserve, () => m);
      batch = [];
      words = 0;
    }
    reserve(8 * (words + c.nTerms * PACKED_STRIDE));
    packCoefficients(c, m, words);
    batch.push({ drop: d, at: words, nTerms: c.nTerms });
    words += c.nTerms * PACKED_STRIDE;
  }
  if (batch.length > 0) runBatch(kernel, batch, words, cosTheta, outs, reserve, () => m);
}

function runBatch(
  k: Kernel,
  batch: { drop: number; at: number; nTerms: number }[],
  words: number,
  cosTheta: Float64Array,
  outs: MieAmplitudes[],
  reserve: (bytes: number) => void,
  view: () => Float64Array,
): void {
  const nMax = Math.max(...batch.map((b) => b.nTerms));
  const nAngles = cosTheta.length;
  const blocks = Math.ceil(nAngles / ANGLES_PER_BLOCK);
  const calls = Math.ceil(blocks / BLOCKS);
  // Layout after the coefficient streams (f64 indices, every region 16-byte aligned): orders, drop table, cosines
  // (padded with μ = 0 to whole calls), each block's recurrence state, each block's chunk table, the sums.
  const ordersAt = words;
  const dropsAt = ordersAt + 2 * nMax;
  const cosAt = dropsAt + 2 * Math.ceil(batch.length / 2);
  const stateAt = cosAt + calls * BLOCKS * ANGLES_PER_BLOCK;
  const tableAt = stateAt + BLOCKS * RECURRENCE_STATE;
  const sumsAt = tableAt + BLOCKS * 8 * CHUNK;
  reserve(8 * (sumsAt + SUMS_PER_BLOCK * BLOCKS * batch.length));
  const m = view();
  for (let i = 0; i < nMax; i++) {
    m[ordersAt + 2 * i] = (i + 2) / (i + 1);
    m[ordersAt + 2 * i + 1] = i + 1;
  }
  const dropTable = new Int32Array(m.buffer, 8 * dropsAt, 2 * batch.length);
  batch.forEach((b, i) => {
    dropTable[2 * i] = 8 * b.at;
    dropTable[2 * i + 1] = b.nTerms;
  });
  m.set(cosTheta, cosAt);
  m.fill(0, cosAt + nAngles, stateAt);
  for (let call = 0; call < calls; call++) {
    const firstBlock = BLOCKS * call;
    // The kernel takes blocks in pairs: an odd last block gets a neighbour of padding (μ = 0), computed and not read.
    const nBlocks = Math.min(BLOCKS, 2 * Math.ceil((blocks - firstBlock) / 2));
    // A few blocks per call: V8 swaps its optimised code in between calls (see simd-amplitudes.ts).
    k.run(8 * ordersAt, nMax, 8 * dropsAt, batch.length, 8 * (cosAt + ANGLES_PER_BLOCK * firstBlock), nBlocks, 8 * stateAt, 8 * tableAt, 8 * sumsAt);
    const first = ANGLES_PER_BLOCK * firstBlock;
    const last = Math.min(nAngles, first + ANGLES_PER_BLOCK * nBlocks);
    batch.forEach((b, i) => {
      // Drop i's sums of block r >> 2 (r = j − first) at sumsAt + 16·(i·nBlocks + block); angle j is lane r & 1 of its vector (r >> 1) & 1.
      const at = sumsAt + SUMS_PER_BLOCK * nBlocks * i;
      for (let j = first; j < last; j++) {
        const r = j - first;
        amplitudeFromLanes(m, at + SUMS_PER_BLOCK * (r >> 2) + 8 * ((r >> 1) & 1) + (r & 1), outs[b.drop], j);
      }
    });
  }
}
