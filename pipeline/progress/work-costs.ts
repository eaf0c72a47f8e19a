// What each piece of a render costs, in nanoseconds of one core, so that progress advances with the time the work
// takes. Measured with bench/progress.ts (`npm run bench:progress`; medians on one core; machine, date and the
// figures in BENCHMARKS.md, "Progress: weights and cost"), on a shared machine whose load slowed every piece
// alike: only their ratios matter to the fraction (the time left is estimated from the measured rate, not from these).

import type { DropEngine } from "../../lib/bow/volume-scattering.js";
import { mieTermCount } from "../../lib/mie/termCount.js";

export const COST_NS = {
  /** One Lorenz–Mie term at one angle (coefficients and amplitudes together). */
  mieTermAngle: 4.7,
  /** One sample of an Airy-engine row (uniform bow formula for the bows, ray optics for the rest). */
  airySample: 4600,
  /** One sample of a ray-optics row. */
  raySample: 990,
  /** Σ over drops: one drop's row at one wavelength and one lattice sample. */
  sumSample: 93,
  /** The sun's disc: one lattice sample at one wavelength, per sample of the disc's kernel. */
  discSample: 93,
  /** Colour: one output angle at one wavelength. */
  colourSample: 2100,
  /** The JSON answer: one output angle. */
  jsonAngle: 4900,
  /** A PNG strip: one output angle (a column of the strip). */
  pngAngle: 9900,
  /** A camera view or sky map: one pixel, shaded and encoded. */
  overlayPixel: 1300,
} as const;

/** Estimated cost of one kernel row over `samples` lattice points. */
export function kernelRowCostNs(engine: DropEngine, sizeParameter: number, samples: number, averagedSizes = 1): number {
  if (engine === "mie") return COST_NS.mieTermAngle * mieTermCount(sizeParameter) * samples * averagedSizes;
  return (engine === "airy" ? COST_NS.airySample : COST_NS.raySample) * samples;
}
