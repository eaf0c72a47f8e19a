import { defineRoute, type RouteSpec } from "../route-spec.js";
import { profileRequestSchema } from "../../schemas/profile.js";
import { clientSignal } from "../plugins/hardening.js";
import { sizeMapQuerySchema, sizeMapRequestSchema, svgQuerySchema } from "../../schemas/figures.js";
import { renderChromaticityFigure, renderSizeMap } from "../../pipeline/render/figure-render.js";
import { type RenderDeps } from "../../pipeline/render/render-output.js";
import { sendOutput } from "../send-output.js";
import type { Config } from "../../pipeline/config/config.js";
import type { KernelService } from "../../pipeline/kernels/kernel-service.js";

export function figureRoutes(config: Config, kernels: KernelService): RouteSpec[] {
  const depsFor = (reply: Parameters<typeof clientSignal>[0]): RenderDeps => ({ kernels, maxTermAngles: config.maxProfileTermAngles, signal: clientSignal(reply) });
  return [
    defineRoute({
      method: "POST",
      url: "/v1/figure/chromaticity",
      tag: "figures",
      summary: "CIE (x, y) chromaticity diagram with the bow's colour path, as SVG",
      description:
        "The body is a profile request (`{}` for the default shower). The SVG shows the spectrum locus of the request's observer " +
        "with wavelength labels, the purple line, the sRGB gamut, the sun's white point and the chromaticity of every angle sample, " +
        "with a magnified detail of the bow's path. The content hash and the sources are in the SVG's <desc>, its caption and the " +
        "`x-antisolar-hash` / `x-antisolar-sources` headers.",
      body: profileRequestSchema,
      query: svgQuerySchema,
      responses: {
        200: { description: "the figure", contentTypes: ["image/svg+xml"] },
        400: { description: "a field out of range" },
        422: { description: "valid, but costlier than the synchronous budget (too-costly), or the light source is below the horizon at the moment given (source-below-horizon)" },
      },
      handle: async ({ body, reply }) => sendOutput(reply, await renderChromaticityFigure(body, depsFor(reply)), "miss"),
    }),
    defineRoute({
      method: "POST",
      url: "/v1/figure/size-map",
      tag: "figures",
      summary: "Colour against ψ and drop radius (log scale), one monodisperse profile per row, as SVG or PNG",
      description:
        "Rows are drops of one radius, log-spaced from `radiusFromUm` to `radiusToUm`; each row is normalised to its own peak " +
        "luminance (row peak = 1) and drawn in sRGB. The diagram type follows Lee 1998 (Applied Optics 37, 1506). " +
        "`?format=png` gives the map alone, one pixel per (angle, radius) sample with the largest radius on top; its axes are " +
        "in the `x-antisolar-axes` header. The synchronous cost limit is shared by the rows.",
      body: sizeMapRequestSchema,
      query: sizeMapQuerySchema,
      responses: {
        200: { description: "the figure", contentTypes: ["image/svg+xml", "image/png"] },
        400: { description: "a field out of range" },
        422: { description: "valid, but costlier than the synchronous budget (too-costly), or the light source is below the horizon at the moment given (source-below-horizon)" },
      },
      handle: async ({ body, query, reply }) => sendOutput(reply, await renderSizeMap(body, query.format ?? "svg", depsFor(reply)), "miss"),
    }),
  ];
}
