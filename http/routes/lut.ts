import { defineRoute, type RouteSpec } from "../route-spec.js";
import { lutRequestSchema, lutQuerySchema, shaderQuerySchema } from "../../schemas/lut.js";
import { renderLut } from "../../pipeline/render/lut-render.js";
import { sendOutput } from "../send-output.js";
import { clientSignal } from "../plugins/hardening.js";
import { shaderSnippets } from "../../pipeline/encoders/lut-shaders.js";
import type { KernelService } from "../../pipeline/kernels/kernel-service.js";
import type { Config } from "../../pipeline/config/config.js";

export function lutRoutes(config: Config, kernels: KernelService): RouteSpec[] {
  return [
    defineRoute({
      method: "POST",
      url: "/v1/lut",
      tag: "textures",
      summary: "A lookup texture of bow radiance against the angle from the antisolar point and drop size",
      description:
        "Rows are monodisperse radii (at a fixed liquid water content) or Marshall–Palmer rain rates, log-spaced; " +
        "columns are angles ψ (linear or bow-weighted mapping). RGB: linear radiance in the chosen space (Y in cd/m²); " +
        "A: the rain curtain's opacity 1 − T. `?part=manifest` gives the mapping; `GET /v1/lut/shader` the sampling code.",
      body: lutRequestSchema,
      query: lutQuerySchema,
      responses: {
        200: { description: "the texture or its manifest", contentTypes: ["image/x-exr", "image/ktx2", "image/vnd.radiance", "image/png", "application/json"], json: ["LutManifest", "LutJson"] },
        400: { description: "a field out of range" },
        422: { description: "valid, but costlier than the synchronous budget (too-costly), or the light source is below the horizon at the moment given (source-below-horizon)" },
      },
      handle: async ({ body, query, reply }) =>
        sendOutput(reply, await renderLut(body, query, { kernels, maxTermAngles: config.maxProfileTermAngles, signal: clientSignal(reply) }), "miss"),
    }),
    defineRoute({
      method: "GET",
      url: "/v1/lut/shader",
      tag: "textures",
      summary: "GLSL, HLSL or WGSL code that samples a lookup texture by the view ray's angle from the anti-sun direction",
      query: shaderQuerySchema,
      responses: { 200: { description: "shader source", contentTypes: ["text/plain"] } },
      handle: async ({ query, reply }) => reply.type("text/plain; charset=utf-8").send(shaderSnippets[query.lang]),
    }),
  ];
}
