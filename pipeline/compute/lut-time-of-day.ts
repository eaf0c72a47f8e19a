// Time-of-day lookup textures: one texture slice per sun elevation, so that an engine whose sun moves samples the
// bows of the hour (the sun's reddening through the air mass changes the bows' colours and brightness).
// Each slice is the single-elevation texture at its elevation, computed by the same code (lut.ts,
// computeLutsAcrossSun): the slices share the kernels and the spectral sums and differ in the sunlight only.
// Flattened drops: one slice per arc position, so that a shader samples the bow of the place along the arc its view
// ray meets; each slice is the single texture at its arc position (its own kernel rows: nothing to share).

import { DEFAULT_ARC_SLICES, type LutRequest } from "../../schemas/lut.js";
import { isFlattened } from "../../schemas/drop-shape.js";
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

/** The evenly spaced values of a slice axis (sun elevations or arc positions), degrees. */
export function sliceElevationsDeg(range: { fromDeg: number; toDeg: number; slices: number }): number[] {
  return Array.from({ length: range.slices }, (_, k) => range.fromDeg + ((range.toDeg - range.fromDeg) * k) / (range.slices - 1));
}

/** The request of slice k: the scenario's sun (or the default sun) at that slice's elevation. */
export function sliceRequest(request: LutRequest, elevationDeg: number): LutRequest {
  const sun = { ...(request.scenario.sun ?? defaultSun), elevationDeg };
  return { ...request, scenario: { ...request.scenario, sun }, sunElevations: undefined };
}

/** The slices of a texture of flattened drops, one per arc position, each the single texture there. */
async function arcSlices(request: LutRequest, values: number[], deps: ProfileDeps, onProgress?: ProgressListener): Promise<Lut[]> {
  const stageNames = values.map((a, k) => `slice ${k + 1} of ${values.length} (arc position ${Number(a.toFixed(2))}°)`);
  const progress = new ProgressMeter(stageNames, onProgress);
  for (const name of stageNames) progress.plan(name, 1);
  // Each slice computes its own (shaped) kernel rows: the slices share the synchronous limit.
  const share = { ...deps, limits: { maxTermAngles: deps.limits.maxTermAngles / values.length } };
  const slices: Lut[] = [];
  for (let k = 0; k < values.length; k++) {
    // The first slice asks for every slice's rows where a pass gives them all (sibling-arcs.ts); the others find them.
    const slice = await computeLut(
      { ...request, scenario: { ...request.scenario, arcPositionDeg: values[k] }, arcPositions: undefined },
      share,
      ({ fraction }) => {
        if (fraction < 1) progress.advance(stageNames[k], fraction);
      },
      "combined",
      k === 0 ? values : undefined,
    );
    progress.complete(stageNames[k]);
    slices.push(slice);
  }
  progress.done();
  return slices;
}

const ARC_SAMPLING =
  "the view ray's arc position from antisolarArcDeg (the shader snippets: world up, sun and view directions); blend the two nearest slices linearly. A plain blend of slices 5° apart differs from the bow computed between them by 2–21 % of its light (bench/arc-interpolation.ts, 2 mm drops: the bow moves along the arc); finer slices shrink it";

export async function computeSlicedLut(request: LutRequest, deps: ProfileDeps, onProgress?: ProgressListener): Promise<SlicedLut> {
  if (!request.sunElevations && isFlattened(request.scenario.drops?.shape)) return computeArcSlicedLut(request, deps, onProgress);
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
  const warnings = new Set(slices.flatMap((s) => s.manifest.warnings as string[]));
  if (request.scenario.sun?.elevationDeg !== undefined) {
    warnings.add("scenario.sun.elevationDeg is replaced by each slice's elevation (sunElevations)");
  }
  progress.done();
  return stacked(request, slices, range, started, warnings, "the sun's elevation above the horizon", "blend the two nearest slices");
}

async function computeArcSlicedLut(request: LutRequest, deps: ProfileDeps, onProgress?: ProgressListener): Promise<SlicedLut> {
  const started = performance.now();
  const range = request.arcPositions ?? DEFAULT_ARC_SLICES;
  const slices = await arcSlices(request, sliceElevationsDeg(range), deps, onProgress);
  const warnings = new Set(slices.flatMap((s) => s.manifest.warnings as string[]));
  if (request.scenario.arcPositionDeg !== undefined) warnings.add("scenario.arcPositionDeg is replaced by each slice's arc position (arcPositions)");
  const quantity = "the arc position: angle around the antisolar point from the bow's highest point (0°) to its lowest (180°), left and right alike";
  return stacked(request, slices, range, started, warnings, quantity, ARC_SAMPLING);
}

/** The slices one after the other, and the manifest that says what they are and where they lie. */
function stacked(
  request: LutRequest,
  slices: Lut[],
  range: { fromDeg: number; toDeg: number; slices: number },
  started: number,
  warnings: Set<string>,
  quantity: string,
  sampling: string,
): SlicedLut {
  const elevations = sliceElevationsDeg(range);
  const { width, height } = slices[0];
  const rgba = new Float32Array(width * height * 4 * slices.length);
  slices.forEach((slice, k) => rgba.set(slice.rgba, k * width * height * 4));
  const manifest = {
    ...slices[0].manifest,
    slices: {
      quantity,
      unit: "degree" as const,
      fromDeg: range.fromDeg,
      toDeg: range.toDeg,
      count: elevations.length,
      valuesDeg: elevations.map((e) => Number(e.toFixed(6))),
      mapping: `linear: slice s = (value − fromDeg) / (toDeg − fromDeg) · (count − 1); ${sampling}`,
      layoutKtx2: "array layer k holds slice k",
      layoutStacked: `slices stacked top to bottom in one image of ${height * elevations.length} rows: rows [k·${height}, (k+1)·${height}) hold slice k`,
      transmittance: "the rain curtain's transmittance does not depend on the sun or the arc position: v.transmittance holds for every slice",
      sliceHashes: slices.map((s) => s.manifest.hash),
    },
    scenario: request,
    hash: requestHash(request),
    warnings: [...warnings],
    computeMs: Math.round(performance.now() - started),
  };
  return { width, height, slices: elevations.length, rgba, manifest };
}
