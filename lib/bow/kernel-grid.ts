// The fixed angle lattice that single-drop kernels are computed and cached on: ψ_j = j·h from the antisolar
// point, in blocks of BLOCK_SAMPLES, at one of a few steps h. Any request maps onto it, so kernels are reusable.

/** Lattice steps (degrees), coarsest first. 0.05° resolves the sun's disc (0.533°) with ≥ 10 samples; the finer
 *  levels serve requests with finer output steps (supernumeraries of millimetre drops are ~0.1° apart). */
export const KERNEL_STEPS_DEG = [0.05, 0.01, 0.002] as const;
export const BLOCK_SAMPLES = 100;

export type KernelStepDeg = (typeof KERNEL_STEPS_DEG)[number];

/** The coarsest lattice step not coarser than the output step (or than maxStepDeg, for convergence studies). */
export function kernelStepFor(outputStepDeg: number, maxStepDeg: number = KERNEL_STEPS_DEG[0]): KernelStepDeg {
  for (const h of KERNEL_STEPS_DEG) if (h <= outputStepDeg + 1e-12 && h <= maxStepDeg + 1e-12) return h;
  return KERNEL_STEPS_DEG[KERNEL_STEPS_DEG.length - 1];
}

/** Index of the last lattice point, at ψ = 180°. */
export function lastLatticeIndex(h: number): number {
  return Math.round(180 / h);
}

export interface LatticeSpan {
  h: number;
  /** First and last lattice index (inclusive) the request needs. */
  first: number;
  last: number;
}

/** The lattice points covering ψ ∈ [loDeg, hiDeg] (clipped to 0–180°), one extra on each side for interpolation. */
export function latticeSpan(loDeg: number, hiDeg: number, h: number): LatticeSpan {
  const first = Math.max(0, Math.floor(loDeg / h + 1e-9) - 1);
  const last = Math.min(lastLatticeIndex(h), Math.ceil(hiDeg / h - 1e-9) + 1);
  return { h, first, last };
}

export function blocksOf(span: LatticeSpan): number[] {
  const out: number[] = [];
  for (let b = Math.floor(span.first / BLOCK_SAMPLES); b <= Math.floor(span.last / BLOCK_SAMPLES); b++) out.push(b);
  return out;
}

/** Lattice indices of a block (the last block stops at ψ = 180°). */
export function blockRange(block: number, h: number): { first: number; count: number } {
  const first = block * BLOCK_SAMPLES;
  const count = Math.min(BLOCK_SAMPLES, lastLatticeIndex(h) - first + 1);
  return { first, count };
}
