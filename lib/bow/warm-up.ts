// A kernel task shaped like a default profile's at a few wavelengths: Mie drops, Airy drops, the bows' tables.
// Run on each worker thread before its first request, so that the request does not pay for V8 compiling the
// TypeScript and tiering up the WebAssembly Mie kernel (measured in BENCHMARKS.md: "first" against "started").

import { kernelRows, type KernelRowsInput } from "./kernel-rows.js";
import { blocksOf, latticeSpan, KERNEL_STEPS_DEG } from "./kernel-grid.js";
import { engineChooser } from "./engine-choice.js";
import { dropMedium } from "../water/drop-medium.js";

/** ψ 30–60° widened by the sun's radius (about 0.27°), on the coarsest lattice: the default profile's span. */
const SPAN = latticeSpan(30 - 0.27, 60 + 0.27, KERNEL_STEPS_DEG[0]);
/** Drop radii across both engines of the auto choice (µm). */
const RADII_UM = [12, 35, 80, 150, 400, 1200];

function warmUpTask(wavelengthNm: number): KernelRowsInput {
  const engine = engineChooser("auto");
  const blocks = blocksOf(SPAN);
  return {
    medium: dropMedium({ temperatureC: 15, salinityPsu: 0 }, wavelengthNm),
    h: SPAN.h,
    items: RADII_UM.map((radiusUm) => ({ radiusUm, engine: engine(radiusUm), blocks })),
    within: { first: SPAN.first, last: SPAN.last },
  };
}

/** Runs `rounds` warm-up tasks (at 450, 550 and 650 nm in turn) and returns the ms each took. */
export function warmUpKernels(rounds: number): number[] {
  const tasks = [450, 550, 650].map(warmUpTask);
  const times: number[] = [];
  for (let r = 0; r < rounds; r++) {
    const t0 = performance.now();
    kernelRows(tasks[r % tasks.length]);
    times.push(performance.now() - t0);
  }
  return times;
}
