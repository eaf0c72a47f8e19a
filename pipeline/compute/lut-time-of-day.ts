// Sliced lookup textures. Time of day: one slice per sun elevation, so that an engine whose sun moves samples the
// bows of the hour (the sun's reddening through the air mass changes the bows' colours and brightness). Flattened
// drops: one slice per arc position, so that a shader samples the bow of the place along the arc its view ray
// meets. Each slice is the single texture at its elevation or arc position, computed by the same code.

import { DEFAULT_ARC_SLICES, type LutRequest } from "../../schemas/lut.js";
import { isFlattened } from "../../schemas/drop-shape.js";
import { defaultSun } from "../../schemas/profile.js";
import { computeLut, type Lut } from "./lut.js";
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

/** What a texture is sliced by, and the request of each slice; undefined for a single texture. */
interface SliceAxis {
  range: { fromDeg: number; toDeg: number; slices: number };
  quantity: string;
  name: (valueDeg: number) => string;
  request: (valueDeg: number) => LutRequest;
  /** How a shader finds its slice (the manifest's mapping). */
  sampling: string;
  replaced?: string;
}

function sliceAxisOf(request: LutRequest): SliceAxis | undefined {
  if (request.sunElevations) {
    return {
      range: request.sunElevations,
      quantity: "the sun's elevation above the horizon",
      name: (e) => `sun at ${Number(e.toFixed(2))}°`,
      request: (e) => sliceRequest(request, e),
      sampling: "blend the two nearest slices",
      replaced: request.scenario.sun?.elevationDeg !== undefined ? "scenario.sun.elevationDeg is replaced by each slice's elevation (sunElevations)" : undefined,
    };
  }
  if (!isFlattened(request.scenario.drops?.shape)) return undefined;
  return {
    range: request.arcPositions ?? DEFAULT_ARC_SLICES,
    quantity: "the arc position: angle around the antisolar point from the bow's highest point (0°) to its lowest (180°), left and right alike",
    name: (a) => `arc position ${Number(a.toFixed(2))}°`,
    request: (a) => ({ ...request, scenario: { ...request.scenario, arcPositionDeg: a }, arcPositions: undefined }),
    sampling:
      "the view ray's arc position from antisolarArcDeg (the shader snippets: world up, sun and view directions); blend the two nearest slices linearly. A plain blend of slices 5° apart differs from the bow computed between them by 2–21 % of its light (bench/arc-interpolation.ts, 2 mm drops: the bow moves along the arc); finer slices shrink it",
    replaced: request.scenario.arcPositionDeg !== undefined ? "scenario.arcPositionDeg is replaced by each slice's arc position" : undefined,
  };
}

/** The request of slice k: the scenario's sun (or the default sun) at that slice's elevation. */
export function sliceRequest(request: LutRequest, elevationDeg: number): LutRequest {
  const sun = { ...(request.scenario.sun ?? defaultSun), elevationDeg };
  return { ...request, scenario: { ...request.scenario, sun }, sunElevations: undefined };
}

export async function computeSlicedLut(request: LutRequest, deps: ProfileDeps, onProgress?: ProgressListener): Promise<SlicedLut> {
  const axis = sliceAxisOf(request);
  if (!axis) {
    const lut = await computeLut(request, deps, onProgress);
    return { ...lut, slices: 1 };
  }
  const range = axis.range;
  const started = performance.now();
  const elevations = sliceElevationsDeg(range);
  const slices: Lut[] = [];
  // Slices weigh the same in the progress (the first one also computes the kernels the others reuse, so the
  // fraction runs slower at first; the time left is estimated from the rate so far).
  const stageNames = elevations.map((e, k) => `slice ${k + 1} of ${elevations.length} (${axis.name(e)})`);
  const progress = new ProgressMeter(stageNames, onProgress);
  for (const name of stageNames) progress.plan(name, 1);
  // Arc slices each compute new (shaped) kernel rows: they share the synchronous limit.
  const sliceDeps = request.sunElevations ? deps : { ...deps, limits: { maxTermAngles: deps.limits.maxTermAngles / elevations.length } };
  for (let k = 0; k < elevations.length; k++) {
    const slice = await computeLut(axis.request(elevations[k]), sliceDeps, ({ fraction }) => {
      if (fraction < 1) progress.advance(stageNames[k], fraction);
    });
    progress.complete(stageNames[k]);
    slices.push(slice);
  }
  const { width, height } = slices[0];
  const rgba = new Float32Array(width * height * 4 * slices.length);
  slices.forEach((slice, k) => rgba.set(slice.rgba, k * width * height * 4));
  const warnings = new Set(slices.flatMap((s) => s.manifest.warnings as string[]));
  if (axis.replaced) warnings.add(axis.replaced);
  progress.done();
  const manifest = {
    ...slices[0].manifest,
    slices: {
      quantity: axis.quantity,
      unit: "degree" as const,
      fromDeg: range.fromDeg,
      toDeg: range.toDeg,
      count: elevations.length,
      valuesDeg: elevations.map((e) => Number(e.toFixed(6))),
      mapping: `linear: slice s = (value − fromDeg) / (toDeg − fromDeg) · (count − 1); ${axis.sampling}`,
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
