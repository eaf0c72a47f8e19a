import type { FastifyReply } from "fastify";
import { defineRoute, type RouteSpec } from "../route-spec.js";
import { imageQuerySchema, skyRequestSchema, viewRequestSchema, type ImageQuery } from "../../schemas/view.js";
import { encodeOverlay, overlayHash, prepareSky, prepareView, type OverlayFile, type PreparedOverlay, type ViewDeps } from "../view-service.js";
import type { Config } from "../config.js";
import type { KernelService } from "../kernel/kernel-service.js";
import { ResultCache } from "../result-cache.js";

function ascii(text: string): string {
  return text.replace(/[^\x20-\x7e]/g, "?");
}

function send(file: OverlayFile, query: ImageQuery, cache: "hit" | "miss", reply: FastifyReply) {
  if (query.part === "manifest") return { ...file.manifest, cache };
  const m = file.manifest as { hash: string; scale: { meaning: string; factor: number }; output: { space: string }; computeMs: number; warnings: string[] };
  return reply
    .type(file.contentType)
    .header("x-antisolar-hash", m.hash)
    .header("x-antisolar-space", m.output.space)
    .header("x-antisolar-scale", ascii(`${m.scale.meaning}; factor ${m.scale.factor}`))
    .header("x-antisolar-compute-ms", String(m.computeMs))
    .header("x-antisolar-cache", cache)
    .header("x-antisolar-warnings", ascii(JSON.stringify(m.warnings)))
    .send(file.body);
}

const responses = {
  200: { description: "the layer, or its JSON manifest with ?part=manifest", contentTypes: ["image/x-exr", "image/vnd.radiance", "image/png", "application/json"] },
  400: { description: "a field out of range" },
  422: { description: "valid, but costlier than the synchronous budget" },
};

/** POST /v1/view (camera) and POST /v1/sky (equirectangular map): bow layers for compositing. */
export function viewRoutes(config: Config, kernels: KernelService): RouteSpec[] {
  // Images are large: a sixteenth of the cache budget, like the profile answers.
  const results = new ResultCache((config.cacheBudgetMb * 2 ** 20) / 16);
  const deps: ViewDeps = { kernels, limits: { maxTermAngles: config.maxProfileTermAngles } };

  async function answer(endpoint: "view" | "sky", prepared: () => Promise<PreparedOverlay>, key: string, query: ImageQuery, reply: FastifyReply) {
    // The manifest depends on the format (space, quantising), so it is cached per format too.
    const cacheKey = `${endpoint}|${key}|${query.format}|${query.part}`;
    const cached = results.get<OverlayFile>(cacheKey);
    if (cached) return send(cached, query, "hit", reply);
    const p = await prepared();
    const file: OverlayFile = query.part === "manifest" ? { body: Buffer.alloc(0), contentType: "application/json", manifest: p.manifest } : await encodeOverlay(p, query.format);
    results.set(cacheKey, file, file.body.length + 16384);
    return send(file, query, "miss", reply);
  }

  return [
    defineRoute({
      method: "POST",
      url: "/v1/view",
      tag: "images",
      summary: "A camera's view of the bows as a compositing layer (EXR, HDR, PNG)",
      description:
        "World frame x east, y north, z up; azimuth clockwise from north. The camera (rectilinear or equidistant fisheye) looks along " +
        "yawDeg/pitchDeg; each pixel's ray gets the profile's colour at its angle ψ from the antisolar point. `{}` renders 1280×720, " +
        "90° wide, looking at the antisolar azimuth 15° up, sun 12° high behind the camera. Default EXR (half, ZIP, RGBA premultiplied); " +
        "?format=hdr|png16|png; ?part=manifest for the JSON sidecar (camera, mapping, scale, hash, sources).",
      body: viewRequestSchema,
      query: imageQuerySchema,
      responses,
      handle: async ({ body, query, reply }) => answer("view", () => prepareView(body, query.format, deps), overlayHash("view", body), query, reply),
    }),
    defineRoute({
      method: "POST",
      url: "/v1/sky",
      tag: "images",
      summary: "The bows on an equirectangular (latitude–longitude) sky map, for environment lighting",
      description:
        "Longitude = azimuth, latitude = elevation: north in the middle column, east at ¾ width, south at the edges; zenith at the top. " +
        "`{}` renders 2048×1024 with the sun at azimuth 240°, 12° high. Same layers, formats and manifest as POST /v1/view.",
      body: skyRequestSchema,
      query: imageQuerySchema,
      responses,
      handle: async ({ body, query, reply }) => answer("sky", () => prepareSky(body, query.format, deps), overlayHash("sky", body), query, reply),
    }),
  ];
}
