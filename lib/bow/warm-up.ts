// A kernel task shaped like a default profile's at a few wavelengths: Mie drops, Airy drops, the bows' tables.
// Run on each worker thread before its first request, so that the request does not pay for V8 compiling the
// TypeScript and tiering up the WebAssembly Mie kernel.

import { kernelRows, type KernelRowsInput } from "./kernel-rows.js";

/** Lattice points of ψ ≈ 29.7–60.3° on the 0.05° lattice (the default profile's range with the sun's disc). */
const WITHIN = { first: 593, last: 1207 };
const BLOCKS = [5, 6, 7, 8, 9, 10, 11, 12];

function warmUpTask(wavelengthNm: number, mRe: number): KernelRowsInput {
  const items = [12, 35, 80, 150, 400, 1200].map((radiusUm) => ({ radiusUm, engine: radiusUm < 100 ? ("mie" as const) : ("airy" as const), blocks: BLOCKS }));
  return { medium: { wavelengthNm, mRe, mIm: 1e-9, nAir: 1.000277 }, h: 0.05, items, within: WITHIN };
}

/** Runs `rounds` warm-up tasks (indices of water near 450, 550 and 650 nm, from memory) and returns the ms taken per round. */
export function warmUpKernels(rounds: number): number[] {
  const tasks = [warmUpTask(450, 1.3374), warmUpTask(550, 1.3333), warmUpTask(650, 1.3309)];
  const times: number[] = [];
  for (let r = 0; r < rounds; r++) {
    const t0 = performance.now();
    kernelRows(tasks[r % tasks.length]);
    times.push(performance.now() - t0);
  }
  return times;
}
