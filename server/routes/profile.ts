import type { FastifyReply, FastifyRequest } from "fastify";
import { defineRoute, type RouteSpec } from "../route-spec.js";
import { profileRequestSchema } from "../../schemas/profile.js";
import { stripQuerySchema } from "../../schemas/formats.js";
import { computeProfile, type ProfileResult } from "../profile-service.js";
import { encodePngStrip } from "../images/png-strip.js";
import { ClientError } from "../errors.js";
import type { Config } from "../config.js";
import type { Preset } from "../presets.js";
import type { KernelService } from "../kernel/kernel-service.js";
import { ResultCache } from "../result-cache.js";
import { requestHash } from "../profile-service.js";

/** Six significant digits: far below any colour difference, and it keeps the JSON small. */
function round6(v: number): number {
  return Number.isFinite(v) ? Number(v.toPrecision(6)) : v;
}

function triples(values: Float64Array): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < values.length; i += 3) out.push([round6(values[i]), round6(values[i + 1]), round6(values[i + 2])]);
  return out;
}

export function profileJson(result: ProfileResult) {
  const { spectral, colour } = result;
  const pairs: number[][] = [];
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

type Format = "json" | "png" | "png16";

function chooseFormat(query: { format?: Format }, request: FastifyRequest): Format {
  if (query.format) return query.format;
  const accept = request.headers.accept ?? "";
  if (/image\/png/.test(accept) && !/application\/json/.test(accept)) return "png";
  return "json";
}

interface StripFile {
  png: Buffer;
  iccDescription: string;
  hash: string;
  computeMs: unknown;
  bows: ProfileResult["bows"];
  warnings: unknown;
  space: string;
}

async function makeStrip(result: ProfileResult, format: Format, query: { height: number; bitDepth?: number }): Promise<StripFile> {
  const bitDepth = (query.bitDepth ?? (format === "png16" ? 16 : 8)) as 8 | 16;
  const strip = await encodePngStrip({ values: result.colour.rgb, height: query.height, bitDepth, space: result.request.output.space });
  return {
    png: strip.png,
    iccDescription: strip.iccDescription,
    hash: String(result.meta.hash),
    computeMs: result.meta.computeMs,
    bows: result.bows,
    warnings: result.meta.warnings,
    space: result.request.output.space,
  };
}

function sendStrip(strip: StripFile, cache: "hit" | "miss", reply: FastifyReply) {
  return reply
    .type("image/png")
    .header("x-antisolar-hash", strip.hash)
    .header("x-antisolar-space", strip.space)
    .header("x-antisolar-icc", strip.iccDescription)
    .header("x-antisolar-compute-ms", String(strip.computeMs))
    .header("x-antisolar-cache", cache)
    .header("x-antisolar-bows", JSON.stringify(strip.bows))
    .header("x-antisolar-warnings", JSON.stringify(strip.warnings).replace(/[^\x20-\x7e]/g, "?"))
    .send(strip.png);
}

export function profileRoutes(config: Config, presets: Map<string, Preset>, kernels: KernelService): RouteSpec[] {
  // Finished answers take a sixteenth of the cache budget; kernels the rest.
  const results = new ResultCache((config.cacheBudgetMb * 2 ** 20) / 16);
  return [
    defineRoute({
      method: "POST",
      url: "/v1/profile",
      tag: "bows",
      summary: "Colour profile of the bows against the angle from the antisolar point, as JSON or a PNG strip",
      description:
        "Drops × sun × observer: spectral radiance per angle ψ and wavelength, integrated with the CIE colour-matching " +
        "functions. `{}` renders a 2 mm/h shower with the sun 10° high. PNG with `?format=png` or `Accept: image/png`: " +
        "one pixel column per angle sample, with an ICC profile (and cICP where the space has code points).",
      body: profileRequestSchema,
      query: stripQuerySchema,
      responses: {
        200: { description: "the profile", contentTypes: ["application/json", "image/png"] },
        400: { description: "a field out of range" },
        422: { description: "valid, but costlier than the synchronous budget" },
      },
      handle: async ({ body, query, request, reply }) => {
        const format = chooseFormat(query, request);
        const key = `${requestHash(body)}|${format}|${query.height}|${query.bitDepth ?? ""}`;
        const cached = results.get<ReturnType<typeof profileJson> | StripFile>(key);
        if (cached) {
          if (format === "json") {
            const json = cached as ReturnType<typeof profileJson>;
            return { ...json, meta: { ...json.meta, cache: "hit" } };
          }
          return sendStrip(cached as StripFile, "hit", reply);
        }
        const result = await computeProfile(body, { kernels, limits: { maxTermAngles: config.maxProfileTermAngles } });
        if (format === "json") {
          const json = profileJson(result);
          results.set(key, json, 200 * json.anglesDeg.length + 4096);
          return json;
        }
        const strip = await makeStrip(result, format, query);
        results.set(key, strip, strip.png.length + 1024);
        return sendStrip(strip, "miss", reply);
      },
    }),
    defineRoute({
      method: "GET",
      url: "/v1/presets",
      tag: "bows",
      summary: "Named demo scenarios, each a complete body for POST /v1/profile",
      responses: { 200: { description: "the presets" } },
      handle: async () => ({
        presets: [...presets.values()].map((p) => ({ name: p.name, title: p.title, description: p.description })),
      }),
    }),
    defineRoute({
      method: "GET",
      url: "/v1/presets/:name",
      tag: "bows",
      summary: "One demo scenario with its complete request body",
      responses: { 200: { description: "the preset" }, 404: { description: "no such preset" } },
      handle: async ({ request }) => {
        const name = (request.params as { name: string }).name;
        const preset = presets.get(name);
        if (!preset) {
          throw new ClientError("not-found", `no preset '${name}'`, { field: "name", allowed: [...presets.keys()].join(", ") });
        }
        return preset;
      },
    }),
  ];
}
