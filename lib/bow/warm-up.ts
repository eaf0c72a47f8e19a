// Kernel tasks shaped like a default profile's and a fog profile's at a few wavelengths: Mie drops, Airy drops, the
// bows' tables, and small drops averaged over their radius cells on a sub-lattice (the many-drops Mie kernel), and one
// flattened drop traced through its 3D shape (lib/bow/shaped-rows.ts). Run on
// each worker thread before its first request, so that the request does not pay for V8 compiling the TypeScript and
// tiering up the WebAssembly Mie kernel (measured in BENCHMARKS.md: "first" against "started"), nor, on a fog request
// after rain ones, for V8 recompiling the code the rain tasks alone had shaped (wrong-map deoptimisations).

import { kernelRows, type KernelRowsInput } from "./kernel-rows.js";
import { blocksOf, latticeSpan, KERNEL_STEPS_DEG } from "./kernel-grid.js";
import { engineChooser } from "./engine-choice.js";
import type { CellAverage } from "./cell-average.js";
import { dropMedium } from "../water/drop-medium.js";

/** ψ 30–60° widened by the sun's radius (about 0.27°), on the coarsest lattice: the default profile's span. */
const SPAN = latticeSpan(30 - 0.27, 60 + 0.27, KERNEL_STEPS_DEG[0]);
/** Drop radii across both engines of the auto choice (µm). */
const RADII_UM = [12, 35, 80, 150, 400, 1200];
/** Fog drops (µm): a lognormal fog's nodes about its 10 µm median, each the mean over its radius cell. */
const FOG_RADII_UM = [4, 7, 10, 14, 20];
/**
 * The cell mean a fog profile's Mie rows take: 8 sizes across a cell of the lattice quadrature's 64 nodes per decade
 * (ln 10 / 64 wide), as radius-density.ts chooses for a 10 µm lognormal fog at 512 sizes per decade.
 */
export const FOG_AVERAGE: CellAverage = { samples: 8, widthLn: Math.LN10 / 64 };

/**
 * A task as a worker receives it: the items with the keys the kernel service gives them, in its order, through
 * structured cloning as a message is, so that V8 sees the objects (hidden classes) a request's tasks bring.
 */
function asReceived(task: KernelRowsInput): KernelRowsInput {
  return structuredClone(task);
}

function warmUpTask(wavelengthNm: number): KernelRowsInput {
  const engine = engineChooser("auto");
  const blocks = blocksOf(SPAN);
  return asReceived({
    medium: dropMedium({ temperatureC: 15, salinityPsu: 0 }, wavelengthNm),
    h: SPAN.h,
    items: RADII_UM.map((radiusUm) => ({ radiusUm, engine: engine(radiusUm), average: undefined, shape: undefined, blocks })),
    within: { first: SPAN.first, last: SPAN.last },
  });
}

function fogWarmUpTask(wavelengthNm: number): KernelRowsInput {
  const blocks = blocksOf(SPAN);
  return asReceived({
    medium: dropMedium({ temperatureC: 15, salinityPsu: 0 }, wavelengthNm),
    h: SPAN.h,
    items: FOG_RADII_UM.map((radiusUm) => ({ radiusUm, engine: "mie" as const, average: FOG_AVERAGE, shape: undefined, blocks })),
    within: { first: SPAN.first, last: SPAN.last },
  });
}

/** ψ 40–42°: the flattened task's window (its tracing costs the same for any window; its binning less). */
const FLATTENED_SPAN = latticeSpan(40, 42, KERNEL_STEPS_DEG[0]);

/**
 * A flattened drop (1 mm, upright, half-way down the bow: a plane in no symmetry) at three wavelengths in one task, as
 * the service sends one shape's rows: each plane traced at the index nodes and interpolated to each wavelength.
 */
function flattenedWarmUpTask(): KernelRowsInput {
  const blocks = blocksOf(FLATTENED_SPAN);
  const shape = { kind: "equilibrium" as const, cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 45, rayOnly: false };
  const water = { temperatureC: 15, salinityPsu: 0 };
  return asReceived({
    medium: dropMedium(water, 450),
    h: FLATTENED_SPAN.h,
    items: [450, 550, 650].map((wavelengthNm) => ({ radiusUm: 1000, engine: "airy" as const, average: undefined, shape, blocks, medium: dropMedium(water, wavelengthNm) })),
    within: { first: FLATTENED_SPAN.first, last: FLATTENED_SPAN.last },
  });
}

/**
 * Runs `rounds` warm-up tasks (rain-like and fog-like in turn, at 450, 550 and 650 nm, then the flattened drop twice:
 * V8 optimised its tracer only after the second) and returns the ms each took. Measured 2026-12-03 (AMD EPYC, Node 20,
 * one thread): 12 rounds 1.6 s, of which the flattened drop's two 1.4 s; the first flattened profile of a started pool
 * (1 mm upright drops at the top of the bow, 41 wavelengths) then took 1.3–1.7 s instead of 5.3–5.9 s. Stops early
 * when `stop()` turns true.
 */
export function warmUpKernels(rounds: number, stop: () => boolean = () => false): number[] {
  const flattened = flattenedWarmUpTask();
  const tasks = [warmUpTask(450), fogWarmUpTask(550), warmUpTask(650), fogWarmUpTask(450), warmUpTask(550), fogWarmUpTask(650), flattened, flattened];
  const times: number[] = [];
  // `stop` is asked between rounds: a pool that closes while its threads warm up ends them after the round they are in.
  for (let r = 0; r < rounds && !stop(); r++) {
    const t0 = performance.now();
    kernelRows(tasks[r % tasks.length]);
    times.push(performance.now() - t0);
  }
  return times;
}
