// What each piece of a render costs, in nanoseconds of one core, so that progress advances with the time the work
// takes. Measured with bench/progress.ts (`npm run bench:progress`; medians on one core) on a quiet machine:
// 2026-12-03 08:58 UTC, AMD EPYC, 2 cores, Node 20.20.2 (BENCHMARKS.md, "Progress: weights and cost"), rounded to
// two or three figures. Only their ratios matter to the fraction (the time left is estimated from the measured
// rate, not from these); the benchmark flags a weight its new measurement puts more than 2× away.

import type { DropEngine } from "../../lib/bow/volume-scattering.js";
import { mieTermCount } from "../../lib/mie/termCount.js";
import { planeCantingNodes } from "../../lib/bow/plane-canting-nodes.js";
import { INDEX_NODES, type ShapedRowSpec } from "../../lib/bow/shaped-rows.js";

export const COST_NS = {
  /** One Lorenz–Mie term at one angle (coefficients and amplitudes together). */
  mieTermAngle: 1.15,
  /** One sample of an Airy-engine row (uniform bow formula for the bows, ray optics for the rest). */
  airySample: 370,
  /** One sample of a ray-optics row. */
  raySample: 105,
  /**
   * A flattened drop's row is one scattering plane per canting node (lib/bow/shaped-rows.ts): the plane's trace and
   * bow tables, whatever its length… Measured by bench/progress.ts on the same machine (2026-12-03 11:00 UTC,
   * load average 2–3, one other job running): one plane of an equilibrium drop about 2 mm at 550 nm over ψ 29.7–60.3° at 0.05° and 0.01°,
   * a straight line through the two, 2.71e8 ns a plane and 2.81e4 ns a bin. Ray-optics planes (method "geometric")
   * build no bow tables and are priced as these, an overestimate; so are the later drops of a spheroid task, which
   * reuse the first drop's planes.
   */
  shapedPlane: 2.7e8,
  /**
   * A plane interpolated across the refractive index from the traced ones (lib/rays/sweep-interpolation.ts): about a fifth of a traced plane, measured on the same machine (2026-12-03
   * 12:40 UTC, CPU time at load average ~7) on 1–2 mm equilibrium drops over Θ 125–155°: traced 120–230 ms, interpolated
   * 25–65 ms (interpolation, the samples traced again, and the bow tables).
   */
  shapedInterpolatedPlane: 5.4e7,
  /** …and each angle bin of that plane. */
  shapedPlaneSample: 2.8e4,
  /** Σ over drops: one drop's row at one wavelength and one lattice sample. */
  sumSample: 11,
  /** The sun's disc: one lattice sample at one wavelength, per sample of the disc's kernel. */
  discSample: 11,
  /** Colour: one output angle at one wavelength. */
  colourSample: 120,
  /** The JSON answer: one output angle. */
  jsonAngle: 2900,
  /** A PNG strip: one output angle (a column of the strip). */
  pngAngle: 5200,
  /** A camera view or sky map: one pixel, shaded and encoded. */
  overlayPixel: 360,
  /**
   * Rough water: one pixel of a view or sky map drawn for one glitter group (lib/view/glitter.ts), about 180 ns
   * (2026-12-03 11:15 UTC on the machine above, load average about 2: a 360 × 180 sky map with 75 groups in 859 ms).
   */
  roughGroupPixel: 180,
} as const;

export type WorkPiece = keyof typeof COST_NS;

/** A measured weight more than this factor away from the one in use is flagged by the benchmark. */
export const WEIGHT_DRIFT_LIMIT = 2;

export interface WeightDrift {
  piece: WorkPiece;
  measuredNs: number;
  inUseNs: number;
  /** measured ÷ in use. */
  ratio: number;
  /** ratio ÷ the median ratio of all pieces: what moves the fraction's pace (a machine twice as fast moves none). */
  relative: number;
  /** The weight in use is stale: ratio beyond WEIGHT_DRIFT_LIMIT either way. */
  stale: boolean;
  /** The weight is out of proportion with the others: relative beyond WEIGHT_DRIFT_LIMIT either way. */
  uneven: boolean;
}

/** Each measured piece against its weight in use (bench/progress.ts prints and records these). */
export function weightDrift(measuredNs: Partial<Record<WorkPiece, number>>, inUse: Record<WorkPiece, number> = COST_NS): WeightDrift[] {
  const entries = Object.entries(measuredNs).filter((e): e is [WorkPiece, number] => e[0] in inUse && Number.isFinite(e[1]) && e[1]! >= 0);
  // The scale is the median over the pieces measured above zero (a fit that found no cost is flagged, not a scale).
  const ratios = entries.filter(([, ns]) => ns > 0).map(([piece, ns]) => ns / inUse[piece]).sort((a, b) => a - b);
  const m = ratios.length;
  const scale = m === 0 ? 1 : m % 2 === 1 ? ratios[(m - 1) / 2] : Math.sqrt(ratios[m / 2 - 1] * ratios[m / 2]);
  const beyond = (r: number) => r > WEIGHT_DRIFT_LIMIT || r < 1 / WEIGHT_DRIFT_LIMIT;
  return entries.map(([piece, ns]) => {
    const ratio = ns / inUse[piece];
    return { piece, measuredNs: ns, inUseNs: inUse[piece], ratio, relative: ratio / scale, stale: beyond(ratio), uneven: beyond(ratio / scale) };
  });
}

/**
 * Estimated cost of one kernel row over `samples` lattice points (a flattened drop's: shape given, at one of
 * `wavelengths` that share its shape's planes: INDEX_NODES planes are traced per shape and canting node, shared among
 * them, and every wavelength's plane is interpolated from those).
 */
export function kernelRowCostNs(engine: DropEngine, sizeParameter: number, samples: number, averagedSizes = 1, shape?: ShapedRowSpec, wavelengths = 1): number {
  if (shape) {
    const plane = (COST_NS.shapedPlane * INDEX_NODES) / wavelengths + COST_NS.shapedInterpolatedPlane;
    return planeCantingNodes(shape).length * (plane + COST_NS.shapedPlaneSample * samples);
  }
  if (engine === "mie") return COST_NS.mieTermAngle * mieTermCount(sizeParameter) * samples * averagedSizes;
  return (engine === "airy" ? COST_NS.airySample : COST_NS.raySample) * samples;
}
