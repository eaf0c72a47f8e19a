// Time-of-day lookup textures: one texture slice per sun elevation, so that an engine whose sun moves samples the
// bows of the hour (the sun's reddening through the air mass changes the bows' colours and brightness).
// Each slice is the single-elevation texture at its elevation, computed by the same code (lut.ts,
// computeLutsAcrossSun): the slices share the kernels and the spectral sums and differ in the sunlight only.

import type { LutRequest } from "../../schemas/lut.js";
import { defaultSun } from "../../schemas/profile.js";
import { computeLut, computeLutsAcrossSun, lutStages, type Lut } from "./lut.js";
import { ProgressMeter, type ProgressListener } from "../progress/progress-meter.js";
import { requestHash, type ProfileDeps } from "./profile.js";

export interface SlicedLut {
  width: number;
  /** Rows of one slice. */
  height: number;
  /** Slices (1 for a single-elevation texture). */
  slices: number;
  /** RGBA, slice after slice, each row-major from its top row. */
  rgba: Float32Array;
  manifest: Lut["manifest"];
}

/** The evenly spaced sun elevations of a time-of-day texture, degrees. */
export function sliceElevationsDeg(range: NonNullable<LutRequest["sunElevations"]>): number[] {
  return Array.from({ length: range.slices }, (_, k) => range.fromDeg + ((range.toDeg - range.fromDeg) * k) / (range.slices - 1));
}

/** The request of slice k: the scenario's sun (or the default sun) at that slice's elevation. */
export function sliceRequest(request: LutRequest, elevationDeg: number): LutRequest {
  const sun = { ...(request.scenario.sun ?? defaultSun), elevationDeg };
  return { ...request, scenario: { ...request.scenario, sun }, sunElevations: undefined };
}

export async function computeSlicedLut(request: LutRequest, deps: ProfileDeps, onProgress?: ProgressListener): Promise<SlicedLut> {
  const range = request.sunElevations;
  if (!range) {
    const lut = await computeLut(request, deps, onProgress);
    return { ...lut, slices: 1 };
  }
  const started = performance.now();
  const elevations = sliceElevationsDeg(range);
  // Progress weighs the real work: the kernels and spectral sums all slices share, then each slice's colour sums.
  const sunStages = elevations.map((e, k) => `slice ${k + 1} of ${elevations.length} (sun at ${Number(e.toFixed(2))}°)`);
  const progress = new ProgressMeter(lutStages(sunStages), onProgress);
  const slices = await computeLutsAcrossSun(
    elevations.map((e) => sliceRequest(request, e)),
    deps,
    progress,
    sunStages,
  );
  const { width, height } = slices[0];
  const rgba = new Float32Array(width * height * 4 * slices.length);
  slices.forEach((slice, k) => rgba.set(slice.rgba, k * width * height * 4));
  const warnings = new Set(slices.flatMap((s) => s.manifest.warnings as string[]));
  if (request.scenario.sun?.elevationDeg !== undefined) {
    warnings.add("scenario.sun.elevationDeg is replaced by each slice's elevation (sunElevations)");
  }
  progress.done();
  const manifest = {
    ...slices[0].manifest,
    slices: {
      quantity: "the sun's elevation above the horizon",
      unit: "degree" as const,
      fromDeg: range.fromDeg,
      toDeg: range.toDeg,
      count: elevations.length,
      valuesDeg: elevations.map((e) => Number(e.toFixed(6))),
      mapping: "linear: slice s = (elevation − fromDeg) / (toDeg − fromDeg) · (count − 1); blend the two nearest slices",
      layoutKtx2: "array layer k holds slice k",
      layoutStacked: `slices stacked top to bottom in one image of ${height * elevations.length} rows: rows [k·${height}, (k+1)·${height}) hold slice k`,
      transmittance: "the rain curtain's transmittance does not depend on the sun: v.transmittance holds for every slice",
      sliceHashes: slices.map((s) => s.manifest.hash),
    },
    scenario: request,
    hash: requestHash(request),
    warnings: [...warnings],
    computeMs: Math.round(performance.now() - started),
  };
  return { width, height, slices: elevations.length, rgba, manifest };
}
