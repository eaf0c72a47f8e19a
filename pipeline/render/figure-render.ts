import sharp from "sharp";
import type { ProfileRequest } from "../../schemas/profile.js";
import { sizeMapRowRequest, type SizeMapRequest } from "../../schemas/figures.js";
import { computeProfile, type ProfileResult } from "../compute/profile.js";
import { AUTO_MIE_BUDGET_TERM_ANGLES } from "../../lib/bow/engine-choice.js";
import { profileProgress } from "./profile-render.js";
import { contentHash } from "../requests/content-hash.js";
import { chromaticityFigureSources, chromaticitySvg } from "../../lib/figures/chromaticity-figure.js";
import { SIZE_MAP_SOURCES, sizeMapRaster, sizeMapSvg, logSpacedRadii, type SizeMapData } from "../../lib/figures/size-map-figure.js";
import { scenarioSentence } from "../../lib/figures/figure-input.js";
import { ClientError } from "../requests/client-error.js";
import { headerSafe, type RenderDeps, type RenderOutput } from "./render-output.js";
import { rowsProgress } from "../progress/rows-progress.js";
import { resolveProfileRequest, resolveSizeMapRequest, sourcePositionHeaders } from "../sky/resolve-source.js";

export const SVG_CONTENT_TYPE = "image/svg+xml; charset=utf-8";

function sourcesOf(result: ProfileResult): string[] {
  return result.meta.sources;
}

/** The provenance every render carries (README, Using it): content hash and published sources, as headers. */
export function figureHeaders(hash: string, sources: readonly string[]): Record<string, string> {
  return { "x-antisolar-hash": hash, "x-antisolar-sources": headerSafe(JSON.stringify(sources)) };
}

export async function renderChromaticityFigure(request: ProfileRequest, deps: RenderDeps): Promise<RenderOutput> {
  const resolved = resolveProfileRequest(request);
  const body = resolved.body;
  // Drawing the figure costs about what the JSON answer does (one point per angle).
  const progress = profileProgress(body, "json", deps);
  const result = await computeProfile(body, { kernels: deps.kernels, limits: { maxTermAngles: deps.maxTermAngles }, signal: deps.signal, progress, saveEachTask: deps.saveEachTask });
  const sources = [...chromaticityFigureSources(body.observer), ...sourcesOf(result)];
  progress?.done();
  return { contentType: SVG_CONTENT_TYPE, body: Buffer.from(chromaticitySvg(result), "utf8"), headers: { ...figureHeaders(result.meta.hash, sources), ...sourcePositionHeaders(resolved.sourcePosition) } };
}

/** Engines over all rows, merged where neighbouring rows used the same one. */
function mergedEngines(results: ProfileResult[]): { engine: string; fromUm: number; toUm: number }[] {
  const out: { engine: string; fromUm: number; toUm: number }[] = [];
  for (const r of results) {
    for (const e of r.meta.method.engines) {
      const last = out[out.length - 1];
      if (last && last.engine === e.engine) last.toUm = e.toUm;
      else out.push({ ...e });
    }
  }
  return out;
}

/** One monodisperse profile per radius; the cost limit is shared by the rows, and the first failure stops the others. */
async function sizeMapRows(body: SizeMapRequest, deps: RenderDeps): Promise<{ radiiUm: Float64Array; results: ProfileResult[] }> {
  const radiiUm = logSpacedRadii(body.radiusFromUm, body.radiusToUm, body.radiusSteps);
  const limits = { maxTermAngles: deps.maxTermAngles / body.radiusSteps };
  const abort = new AbortController();
  const stop = () => abort.abort();
  deps.signal?.addEventListener("abort", stop);
  // The rows share auto's Mie budget as they share the cost limit.
  const resolution = { autoMieBudgetTermAngles: AUTO_MIE_BUDGET_TERM_ANGLES / body.radiusSteps };
  // Each row weighs its own cost (a size map's large drops cost more than its small ones); rows run side by side.
  const progress = deps.onProgress
    ? rowsProgress(radiiUm.length, (k) => [sizeMapRowRequest(body, radiiUm[k]), resolution], deps.kernels.parallelism, deps.onProgress)
    : undefined;
  try {
    const results = await Promise.all(
      Array.from(radiiUm, async (radiusUm, k) => {
        try {
          const part = progress?.part(k);
          const result = await computeProfile(sizeMapRowRequest(body, radiusUm), { kernels: deps.kernels, limits, signal: abort.signal, progress: part }, resolution);
          part?.done();
          return result;
        } catch (err) {
          abort.abort();
          if (err instanceof ClientError && err.code === "too-costly") {
            throw new ClientError(
              "too-costly",
              `the row for ${radiusUm.toPrecision(4)} µm drops is too costly: ${err.message}. A size map shares the synchronous limit among its ` +
                `${body.radiusSteps} rows; use fewer rows, fewer angles or wavelengths, method "auto", or POST /v1/jobs`,
              { ...err.details, field: "radiusSteps" },
            );
          }
          throw err;
        }
      }),
    );
    return { radiiUm, results };
  } finally {
    deps.signal?.removeEventListener("abort", stop);
    abort.abort();
  }
}

export async function renderSizeMap(request: SizeMapRequest, format: "svg" | "png", deps: RenderDeps): Promise<RenderOutput> {
  const resolved = resolveSizeMapRequest(request);
  const body = resolved.body;
  const hash = contentHash(request, "figure/size-map");
  const { radiiUm, results } = await sizeMapRows(body, deps);
  const anglesDeg = results[0].spectral.anglesDeg;
  const srgb = new Float64Array(radiiUm.length * anglesDeg.length * 3);
  results.forEach((r, i) => srgb.set(r.colour.rgb, i * anglesDeg.length * 3));
  const sources = [...new Set(results.flatMap(sourcesOf))];
  const map: SizeMapData = {
    radiiUm,
    anglesDeg,
    srgb,
    bows: results.map((r) => r.bows),
    scenario: scenarioSentence(results[0].request, { method: { engines: mergedEngines(results) } }, false),
    hash,
    sources,
  };
  if (format === "svg") return { contentType: SVG_CONTENT_TYPE, body: Buffer.from(sizeMapSvg(map), "utf8"), headers: { ...figureHeaders(hash, [...SIZE_MAP_SOURCES, ...sources]), ...sourcePositionHeaders(resolved.sourcePosition) } };
  const raster = sizeMapRaster(map);
  const png = await sharp(raster.pixels, { raw: { width: raster.width, height: raster.height, channels: 3 } }).png().toBuffer();
  const axes = {
    psi: { fromDeg: anglesDeg[0], toDeg: anglesDeg[anglesDeg.length - 1], count: anglesDeg.length, columns: "left to right" },
    radiusUm: { from: radiiUm[0], to: radiiUm[radiiUm.length - 1], count: radiiUm.length, scale: "log", rows: "largest on top" },
    normalisation: "each row's peak luminance = 1",
    space: "srgb",
  };
  return { contentType: "image/png", body: png, headers: { ...figureHeaders(hash, [...SIZE_MAP_SOURCES, ...sources]), ...sourcePositionHeaders(resolved.sourcePosition), "x-antisolar-axes": headerSafe(JSON.stringify(axes)) } };
}

