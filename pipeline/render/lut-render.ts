import type { z } from "zod";
import type { LutRequest, lutQuerySchema } from "../../schemas/lut.js";
import { computeLut, type Lut } from "../compute/lut.js";
import { encodeExr } from "../encoders/exr.js";
import { encodeRadianceHdr } from "../encoders/radiance-hdr.js";
import { encodePngImage } from "../encoders/png-strip.js";
import { spacePrimaries } from "../../lib/colour/primaries.js";
import { jsonOutput, type RenderDeps, type RenderOutput } from "./render-output.js";

export type LutQuery = z.output<typeof lutQuerySchema>;

function rgbOnly(lut: Lut): Float32Array {
  const out = new Float32Array(lut.width * lut.height * 3);
  for (let p = 0; p < lut.width * lut.height; p++) out.set(lut.rgba.subarray(4 * p, 4 * p + 3), 3 * p);
  return out;
}

export async function renderLut(body: LutRequest, query: LutQuery, deps: RenderDeps): Promise<RenderOutput> {
  const lut = await computeLut(body, { kernels: deps.kernels, limits: { maxTermAngles: deps.maxTermAngles }, signal: deps.signal }, deps.onProgress);
  const { manifest } = lut;
  const headers = { "x-antisolar-hash": manifest.hash };
  if (query.part === "manifest") return jsonOutput(manifest, headers);
  switch (query.format) {
    case "json": {
      const rows: number[][][] = [];
      for (let j = 0; j < lut.height; j++) {
        const row: number[][] = [];
        for (let i = 0; i < lut.width; i++) row.push(Array.from(lut.rgba.subarray(4 * (j * lut.width + i), 4 * (j * lut.width + i) + 4)));
        rows.push(row);
      }
      return jsonOutput({ manifest, texels: rows }, headers);
    }
    case "exr":
      return {
        contentType: "image/x-exr",
        headers,
        body: encodeExr({
          width: lut.width,
          height: lut.height,
          channels: ["R", "G", "B", "A"],
          data: lut.rgba,
          pixelType: query.pixelType,
          compression: "zip",
          chromaticities: body.space === "xyz-d65" ? undefined : spacePrimaries(body.space),
          attributes: {
            comments: JSON.stringify({ u: manifest.u, v: manifest.v, scale: manifest.scale }).slice(0, 60_000),
            "antisolar:space": body.space,
            "antisolar:hash": manifest.hash,
          },
        }),
      };
    case "hdr": {
      const c = spacePrimaries(body.space);
      return {
        contentType: "image/vnd.radiance",
        headers: { ...headers, "x-antisolar-note": "Radiance RGBE has no alpha: the transmittance is in the manifest's v.transmittance" },
        body: encodeRadianceHdr({ width: lut.width, height: lut.height, data: rgbOnly(lut), primaries: [c.red, c.green, c.blue, c.white] }),
      };
    }
    case "png16": {
      // PNG holds 0..1: RGB are divided by the largest RGB value, which the header states.
      let peak = 0;
      for (let p = 0; p < lut.width * lut.height; p++) for (let k = 0; k < 3; k++) peak = Math.max(peak, lut.rgba[4 * p + k]);
      const scaled = Float32Array.from(lut.rgba, (v, k) => (k % 4 === 3 ? v : peak > 0 ? v / peak : 0));
      const png = await encodePngImage({ width: lut.width, height: lut.height, channels: 4, values: scaled, bitDepth: 16, space: body.space });
      return { contentType: "image/png", headers: { ...headers, "x-antisolar-scale": String(peak) }, body: png.png };
    }
  }
}
