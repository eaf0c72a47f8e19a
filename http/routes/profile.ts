import type { FastifyRequest } from "fastify";
import { defineRoute, type RouteSpec } from "../route-spec.js";
import { profileRequestSchema } from "../../schemas/profile.js";
import { stripQuerySchema } from "../../schemas/formats.js";
import { ResultCache } from "../../pipeline/render/result-cache.js";
import { requestHash } from "../../pipeline/compute/profile.js";
import { renderProfile, type ProfileFormat } from "../../pipeline/render/profile-render.js";
import { asCacheHit, type RenderOutput } from "../../pipeline/render/render-output.js";
import { sendOutput } from "../send-output.js";
import { profileExamples } from "./source-examples.js";
import { ClientError } from "../../pipeline/requests/client-error.js";
import { clientSignal } from "../plugins/hardening.js";
import type { Config } from "../../pipeline/config/config.js";
import type { Preset } from "../../pipeline/requests/presets.js";
import type { KernelService } from "../../pipeline/kernels/kernel-service.js";
import type { PresetList } from "../../schemas/responses/profile-response.js";

function chooseFormat(query: { format?: ProfileFormat }, request: FastifyRequest): ProfileFormat {
  if (query.format) return query.format;
  const accept = request.headers.accept ?? "";
  if (/image\/png/.test(accept) && !/application\/json/.test(accept)) return "png";
  if (/image\/svg\+xml/.test(accept) && !/application\/json/.test(accept)) return "svg";
  return "json";
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
        "one pixel column per angle sample, with an ICC profile (and cICP where the space has code points). " +
        "`?format=svg` or `Accept: image/svg+xml`: a labelled figure of luminance and polarisation against ψ over the colour strip.",
      body: profileRequestSchema,
      examples: profileExamples,
      query: stripQuerySchema,
      responses: {
        200: { description: "the profile", contentTypes: ["application/json", "image/png", "image/svg+xml"], json: "Profile" },
        400: { description: "a field out of range" },
        422: { description: "valid, but costlier than the synchronous budget (too-costly), or the light source is below the horizon at the moment given (source-below-horizon)" },
      },
      handle: async ({ body, query, request, reply }) => {
        const format = chooseFormat(query, request);
        const key = `${requestHash(body)}|${format}|${query.height}|${query.bitDepth ?? ""}`;
        const cached = results.get<RenderOutput>(key);
        if (cached) return sendOutput(reply, cached, "hit");
        const output = await renderProfile(body, format, query, { kernels, maxTermAngles: config.maxProfileTermAngles, signal: clientSignal(reply) });
        results.set(key, asCacheHit(output), output.body.length + 1024);
        return sendOutput(reply, output, "miss");
      },
    }),
    defineRoute({
      method: "GET",
      url: "/v1/presets",
      tag: "bows",
      summary: "Named demo scenarios, each a complete body for POST /v1/profile",
      responses: { 200: { description: "the presets", json: "PresetList" } },
      handle: async (): Promise<PresetList> => ({
        presets: [...presets.values()].map((p) => ({ name: p.name, title: p.title, description: p.description })),
      }),
    }),
    defineRoute({
      method: "GET",
      url: "/v1/presets/:name",
      tag: "bows",
      summary: "One demo scenario with its complete request body",
      responses: { 200: { description: "the preset", json: "Preset" }, 404: { description: "no such preset" } },
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
