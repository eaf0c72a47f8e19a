import type { FastifyReply } from "fastify";
import { defineRoute, type RouteSpec } from "../route-spec.js";
import { imageQuerySchema, skyRequestSchema, viewRequestSchema, type ImageQuery, type SkyRequest, type ViewRequest } from "../../schemas/view.js";
import { overlayHash } from "../../pipeline/compute/view.js";
import { renderOverlay } from "../../pipeline/render/view-render.js";
import { asCacheHit, type RenderOutput } from "../../pipeline/render/render-output.js";
import { sendOutput } from "../send-output.js";
import { viewExamples } from "./source-examples.js";
import { clientSignal } from "../plugins/hardening.js";
import type { Config } from "../../pipeline/config/config.js";
import type { KernelService } from "../../pipeline/kernels/kernel-service.js";
import { ResultCache } from "../../pipeline/render/result-cache.js";

function responses(manifest: "ViewManifest" | "SkyManifest") {
  return {
    200: { description: "the layer, or its JSON manifest with ?part=manifest", contentTypes: ["image/x-exr", "image/vnd.radiance", "image/png", "application/json"], json: manifest },
    400: { description: "a field out of range" },
    422: { description: "valid, but costlier than the synchronous budget (too-costly), or the light source is below the horizon at the moment given (source-below-horizon)" },
  };
}

/** POST /v1/view (camera) and POST /v1/sky (equirectangular map): bow layers for compositing. */
export function viewRoutes(config: Config, kernels: KernelService): RouteSpec[] {
  // Images are large: a sixteenth of the cache budget, like the profile answers.
  const results = new ResultCache((config.cacheBudgetMb * 2 ** 20) / 16);

  async function answer(endpoint: "view" | "sky", body: ViewRequest | SkyRequest, query: ImageQuery, reply: FastifyReply) {
    // The manifest depends on the format (space, quantising), so it is cached per format too.
    const cacheKey = `${endpoint}|${overlayHash(endpoint, body)}|${query.format}|${query.part}${query.layers === "by-order" ? "|by-order" : ""}`;
    const cached = results.get<RenderOutput>(cacheKey);
    if (cached) return sendOutput(reply, cached, "hit");
    const output = await renderOverlay(endpoint, body, query, { kernels, maxTermAngles: config.maxProfileTermAngles, signal: clientSignal(reply) });
    results.set(cacheKey, asCacheHit(output), output.body.length + 16384);
    return sendOutput(reply, output, "miss");
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
      examples: viewExamples,
      query: imageQuerySchema,
      responses: responses("ViewManifest"),
      handle: async ({ body, query, reply }) => answer("view", body, query, reply),
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
      responses: responses("SkyManifest"),
      handle: async ({ body, query, reply }) => answer("sky", body, query, reply),
    }),
  ];
}
