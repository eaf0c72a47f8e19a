import { defineRoute, type RouteSpec } from "../route-spec.js";
import { lutRequestSchema, lutQuerySchema, shaderQuerySchema } from "../../schemas/lut.js";
import { computeLut, type Lut } from "../lut-service.js";
import { encodeExr } from "../images/exr.js";
import { encodeRadianceHdr } from "../images/radiance-hdr.js";
import { encodePngImage } from "../images/png-strip.js";
import { spaceChromaticities } from "../images/space-chromaticities.js";
import { shaderSnippets } from "../shaders/lut-shaders.js";
import type { KernelService } from "../kernel/kernel-service.js";
import type { Config } from "../config.js";

function rgbOnly(lut: Lut): Float32Array {
  const out = new Float32Array(lut.width * lut.height * 3);
  for (let p = 0; p < lut.width * lut.height; p++) out.set(lut.rgba.subarray(4 * p, 4 * p + 3), 3 * p);
  return out;
}

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
        200: { description: "the texture or its manifest", contentTypes: ["image/x-exr", "image/vnd.radiance", "image/png", "application/json"] },
        400: { description: "a field out of range" },
        422: { description: "valid, but costlier than the synchronous budget" },
      },
      handle: async ({ body, query, reply }) => {
        const lut = await computeLut(body, { kernels, limits: { maxTermAngles: config.maxProfileTermAngles } });
        const { manifest } = lut;
        reply.header("x-antisolar-hash", String(manifest.hash));
        if (query.part === "manifest") return manifest;
        switch (query.format) {
          case "json": {
            const rows: number[][][] = [];
            for (let j = 0; j < lut.height; j++) {
              const row: number[][] = [];
              for (let i = 0; i < lut.width; i++) row.push(Array.from(lut.rgba.subarray(4 * (j * lut.width + i), 4 * (j * lut.width + i) + 4)));
              rows.push(row);
            }
            return { manifest, texels: rows };
          }
          case "exr":
            return reply.type("image/x-exr").send(
              encodeExr({
                width: lut.width,
                height: lut.height,
                channels: ["R", "G", "B", "A"],
                data: lut.rgba,
                pixelType: query.pixelType,
                compression: "zip",
                chromaticities: body.space === "xyz-d65" ? undefined : spaceChromaticities(body.space),
                attributes: { comments: JSON.stringify({ u: manifest.u, v: manifest.v, scale: manifest.scale }).slice(0, 60_000), "antisolar:space": body.space, "antisolar:hash": String(manifest.hash) },
              }),
            );
          case "hdr": {
            const c = spaceChromaticities(body.space);
            return reply
              .type("image/vnd.radiance")
              .header("x-antisolar-note", "Radiance RGBE has no alpha: the transmittance is in the manifest's v.transmittance")
              .send(encodeRadianceHdr({ width: lut.width, height: lut.height, data: rgbOnly(lut), primaries: [c.red, c.green, c.blue, c.white] }));
          }
          case "png16": {
            // PNG holds 0..1: RGB are divided by the largest RGB value, which the header and manifest state.
            let peak = 0;
            for (let p = 0; p < lut.width * lut.height; p++) for (let k = 0; k < 3; k++) peak = Math.max(peak, lut.rgba[4 * p + k]);
            const scaled = Float32Array.from(lut.rgba, (v, k) => (k % 4 === 3 ? v : peak > 0 ? v / peak : 0));
            const png = await encodePngImage({ width: lut.width, height: lut.height, channels: 4, values: scaled, bitDepth: 16, space: body.space });
            return reply.type("image/png").header("x-antisolar-scale", String(peak)).send(png.png);
          }
        }
      },
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
