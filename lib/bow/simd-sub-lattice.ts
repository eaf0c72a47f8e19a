// interpolateSubLattice on WebAssembly SIMD lanes (lib/mie/wasm/sub-lattice.wat): both rows in one pass (lane 0 β⊥,
// lane 1 β∥), the same weights and the taps summed in the same order with separate multiply and add, so the values
// are the TypeScript loop's to the bit; four outputs of one residue run as independent sums, where the TypeScript
// loop waits on one chain of additions per row.

import { instantiateKernel } from "../mie/wasm/load.js";
import { SUB_LATTICE_POINTS, type interpolateSubLattice } from "./mie-sub-lattice.js";

interface Kernel {
  interpolate(weights: number, coarse: number, points: number, c: number, lo: number, hi: number, qLo: number, outA: number, outB: number): void;
  memory: WebAssembly.Memory;
}

const PAGE_BYTES = 65536;
const kernel = instantiateKernel("sub-lattice", "exact") as Kernel | null;

/** The weights table held at the start of the memory, and how many of its values. */
let loadedWeights: Float64Array | null = null;
let loadedLength = 0;

/** Whether the WebAssembly interpolation runs here (WebAssembly SIMD present). */
export const simdSubLatticeAvailable = kernel !== null;

/**
 * As interpolateSubLattice (same arguments, same values to the bit); false, with the outputs untouched, where
 * WebAssembly SIMD is missing. The weights are held by identity between calls: a table must not change in place.
 */
export function interpolateSubLatticeSimd(
  ...[coarseA, coarseB, qLo, c, weights, lo, hi, outA, outB, points = SUB_LATTICE_POINTS]: Parameters<typeof interpolateSubLattice>
): boolean {
  if (kernel === null) return false;
  const nodes = coarseA.length;
  const outputs = hi - lo + 1;
  // Layout (f64 indices): weights (c·points), nodes interleaved (2·nodes), outA, outB (outputs each).
  const coarseAt = c * points;
  const outAAt = coarseAt + 2 * nodes;
  const outBAt = outAAt + outputs;
  const bytes = 8 * (outBAt + outputs);
  const have = kernel.memory.buffer.byteLength;
  if (have < bytes) kernel.memory.grow(Math.ceil((bytes - have) / PAGE_BYTES));
  const memory = new Float64Array(kernel.memory.buffer);
  // The weights stay at the start of the memory from call to call (the drops of one c-group share them): copied
  // only when they are another table (growing the memory keeps its contents).
  if (loadedWeights !== weights || loadedLength !== c * points) {
    memory.set(weights.subarray(0, c * points), 0);
    loadedWeights = weights;
    loadedLength = c * points;
  }
  for (let q = 0; q < nodes; q++) {
    memory[coarseAt + 2 * q] = coarseA[q];
    memory[coarseAt + 2 * q + 1] = coarseB[q];
  }
  kernel.interpolate(0, 8 * coarseAt, points, c, lo, hi, qLo, 8 * outAAt, 8 * outBAt);
  outA.set(memory.subarray(outAAt, outAAt + outputs));
  outB.set(memory.subarray(outBAt, outBAt + outputs));
  return true;
}
