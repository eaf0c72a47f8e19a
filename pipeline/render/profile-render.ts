import type { z } from "zod";
import type { ProfileRequest } from "../../schemas/profile.js";
import type { stripQuerySchema } from "../../schemas/formats.js";
import { computeProfile, PROFILE_STAGES, type ProfileResult } from "../compute/profile.js";
import { angleCount } from "../../schemas/angles.js";
import { ProgressMeter } from "../progress/progress-meter.js";
import { COST_NS } from "../progress/work-costs.js";
import { encodePngStrip } from "../encoders/png-strip.js";
import { jsonOutput, headerSafe, type RenderDeps, type RenderOutput } from "./render-output.js";
import { profileSvg } from "../../lib/figures/profile-figure.js";
import type { ProfileResponse } from "../../schemas/responses/profile-response.js";
import { annotate, resolveProfileRequest, sourcePositionHeaders } from "../sky/resolve-source.js";

export type StripQuery = z.output<typeof stripQuerySchema>;
export type ProfileFormat = "json" | "png" | "png16" | "svg";

/** Six significant digits: far below any colour difference, and it keeps the JSON small. */
function round6(v: number): number {
  return Number.isFinite(v) ? Number(v.toPrecision(6)) : v;
}

function triples(values: Float64Array): [number, number, number][] {
  const out: [number, number, number][] = [];
  for (let i = 0; i < values.length; i += 3) out.push([round6(values[i]), round6(values[i + 1]), round6(values[i + 2])]);
  return out;
}

export function profileJson(result: ProfileResult): ProfileResponse {
  const { spectral, colour } = result;
  const pairs: [number, number][] = [];
  for (let i = 0; i < colour.chromaticity.length; i += 2) {
    pairs.push([round6(colour.chromaticity[i]), round6(colour.chromaticity[i + 1])]);
  }
  return {
    anglesDeg: Array.from(spectral.anglesDeg, round6),
    xyz: triples(colour.xyz),
    chromaticity: pairs,
    luminance: Array.from(colour.luminance, round6),
    rgb: triples(colour.rgb),
    space: result.request.output.space,
    outOfGamut: Array.from(colour.outOfGamut, (v) => v === 1),
    polarisation: Array.from(colour.polarisation, round6),
    bows: result.bows,
    meta: result.meta,
  };
}

function describingHeaders(result: ProfileResult): Record<string, string> {
  return {
    ...sourcePositionHeaders(result.meta.sourcePosition),
    "x-antisolar-hash": result.meta.hash,
    "x-antisolar-space": result.request.output.space,
    "x-antisolar-compute-ms": String(result.meta.computeMs),
    "x-antisolar-bows": JSON.stringify(result.bows),
    "x-antisolar-warnings": headerSafe(JSON.stringify(result.meta.warnings)),
  };
}

/** A profile's progress: its own stages, then the encoding of the answer (planned before the work starts). */
export function profileProgress(body: ProfileRequest, format: ProfileFormat, deps: RenderDeps): ProgressMeter {
  const meter = new ProgressMeter([...PROFILE_STAGES, "encoding"], deps.onProgress);
  meter.plan("encoding", angleCount(body.angles) * (format === "png" || format === "png16" ? COST_NS.pngAngle : COST_NS.jsonAngle));
  return meter;
}

export async function renderProfile(request: ProfileRequest, format: ProfileFormat, query: StripQuery, deps: RenderDeps): Promise<RenderOutput> {
  const resolved = resolveProfileRequest(request);
  const body = resolved.body;
  const progress = profileProgress(body, format, deps);
  const result = await computeProfile(body, { kernels: deps.kernels, limits: { maxTermAngles: deps.maxTermAngles }, signal: deps.signal, progress, saveEachTask: deps.saveEachTask });
  annotate(result.meta, resolved);
  const output = await encodeProfile(result, body, format, query);
  progress.complete("encoding");
  progress.done();
  return output;
}

async function encodeProfile(result: ProfileResult, body: ProfileRequest, format: ProfileFormat, query: StripQuery): Promise<RenderOutput> {
  if (format === "json") return jsonOutput(profileJson(result), { "x-antisolar-hash": result.meta.hash });
  if (format === "svg") {
    const sources = headerSafe(JSON.stringify(result.meta.sources));
    return { contentType: "image/svg+xml; charset=utf-8", body: Buffer.from(profileSvg(result), "utf8"), headers: { ...describingHeaders(result), "x-antisolar-sources": sources } };
  }
  const bitDepth = (query.bitDepth ?? (format === "png16" ? 16 : 8)) as 8 | 16;
  const strip = await encodePngStrip({ values: result.colour.rgb, height: query.height, bitDepth, space: body.output.space });
  return { contentType: "image/png", body: strip.png, headers: { ...describingHeaders(result), "x-antisolar-icc": strip.iccDescription } };
}
