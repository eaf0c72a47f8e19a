import type { z } from "zod";
import { isFlattened } from "../../schemas/drop-shape.js";
import type { LutRequest, lutQuerySchema } from "../../schemas/lut.js";
import { computeSlicedLut, type SlicedLut } from "../compute/lut-time-of-day.js";
import { encodeExr } from "../encoders/exr.js";
import { encodeKtx2 } from "../encoders/ktx2.js";
import { encodeRadianceHdr } from "../encoders/radiance-hdr.js";
import { encodePngImage } from "../encoders/png-strip.js";
import { spacePrimaries } from "../../lib/colour/primaries.js";
import { jsonOutput, type RenderDeps, type RenderOutput } from "./render-output.js";
import { annotate, resolveLutRequest, sourcePositionHeaders, type Resolved } from "../sky/resolve-source.js";
import { computeLut } from "../compute/lut.js";
import { withOrderLayers } from "../compute/order-layers.js";
import { ClientError } from "../requests/client-error.js";
import type { ProfileDeps } from "../compute/profile.js";
import type { ProgressListener } from "../progress/progress-meter.js";

export type LutQuery = z.output<typeof lutQuerySchema>;

function rgbOnly(lut: SlicedLut): Float32Array {
  const out = new Float32Array(lut.width * lut.height * lut.slices * 3);
  for (let p = 0; p < lut.width * lut.height * lut.slices; p++) out.set(lut.rgba.subarray(4 * p, 4 * p + 3), 3 * p);
  return out;
}

export async function renderLut(request: LutRequest, query: LutQuery, deps: RenderDeps): Promise<RenderOutput> {
  const resolved = resolveLutRequest(request);
  const lut = await computeLutForQuery(resolved.body, query, { kernels: deps.kernels, limits: { maxTermAngles: deps.maxTermAngles }, signal: deps.signal }, deps.onProgress);
  return encodeLut(lut, resolved, query);
}

/**
 * The texture a query asks for: time-of-day slices when the body has sunElevations, the layers by scattering
 * order with layers "by-order" (one elevation only: both together are a 400 naming `layers`). POST /v1/lut and
 * `antisolar bake` alike.
 */
export async function computeLutForQuery(body: LutRequest, query: LutQuery, deps: ProfileDeps, onProgress?: ProgressListener): Promise<SlicedLut & { orders?: Float32Array[] }> {
  if (query.layers !== "by-order") return computeSlicedLut(body, deps, onProgress);
  if (isFlattened(body.scenario.drops?.shape)) {
    throw new ClientError("invalid-request", `query field 'layers' "by-order" is for spherical drops: with body field 'scenario.drops.shape' (flattened drops, sliced by arc position) ask layers "combined"`, {
      field: "layers",
      allowed: "combined (with flattened drops)",
    });
  }
  if (body.sunElevations) {
    throw new ClientError("invalid-request", `query field 'layers' "by-order" and body field 'sunElevations' do not go together: a time-of-day texture is written with layers "combined"; ask one elevation for the layers`, {
      field: "layers",
      allowed: "combined (with sunElevations)",
    });
  }
  return { ...(await computeLut(body, deps, onProgress, "by-order")), slices: 1 };
}

/**
 * A computed texture as the file (or manifest) the query asks for: the one encoding of POST /v1/lut and
 * `antisolar bake`. The manifest takes the resolved source's position, moonlight and warnings.
 */
export async function encodeLut(lut: SlicedLut & { orders?: Float32Array[] }, resolved: Resolved<LutRequest>, query: LutQuery): Promise<RenderOutput> {
  const body = resolved.body;
  const { manifest } = lut;
  annotate(manifest, resolved);
  const headers = { ...sourcePositionHeaders(resolved.sourcePosition), "x-antisolar-hash": manifest.hash };
  if (query.part === "manifest") return jsonOutput(manifest, headers);
  // Files without layers hold a time-of-day texture's slices stacked top to bottom (the manifest states it).
  const stackedHeight = lut.height * lut.slices;
  switch (query.format) {
    case "json": {
      const rows: number[][][] = [];
      for (let j = 0; j < lut.height * lut.slices; j++) {
        const row: number[][] = [];
        for (let i = 0; i < lut.width; i++) row.push(Array.from(lut.rgba.subarray(4 * (j * lut.width + i), 4 * (j * lut.width + i) + 4)));
        rows.push(row);
      }
      if (lut.slices === 1) return jsonOutput({ manifest, texels: rows }, headers);
      const slices = Array.from({ length: lut.slices }, (_, k) => rows.slice(k * lut.height, (k + 1) * lut.height));
      return jsonOutput({ manifest, slices }, headers);
    }
    case "exr": {
      const layered = lut.orders ? withOrderLayers(lut.rgba, ["R", "G", "B", "A"], lut.orders, lut.width * stackedHeight) : undefined;
      return {
        contentType: "image/x-exr",
        headers,
        body: encodeExr({
          width: lut.width,
          height: stackedHeight,
          channels: layered?.channels ?? ["R", "G", "B", "A"],
          data: layered?.data ?? lut.rgba,
          pixelType: query.pixelType,
          compression: "zip",
          chromaticities: body.space === "xyz-d65" ? undefined : spacePrimaries(body.space),
          attributes: {
            comments: JSON.stringify({ u: manifest.u, v: manifest.v, scale: manifest.scale }).slice(0, 60_000),
            "antisolar:space": body.space,
            ...(lut.slices > 1 ? { "antisolar:slices": JSON.stringify(manifest.slices).slice(0, 60_000) } : {}),
            "antisolar:hash": manifest.hash,
          },
        }),
      };
    }
    case "ktx2":
      return {
        contentType: "image/ktx2",
        headers,
        body: Buffer.from(
          encodeKtx2({
            width: lut.width,
            height: lut.height,
            layers: lut.slices,
            rgba: lut.rgba,
            pixelType: query.pixelType,
            space: body.space,
            premultipliedAlpha: true,
            keyValues: {
              "antisolar.mapping": JSON.stringify({ u: manifest.u, v: manifest.v, slices: manifest.slices, scale: manifest.scale, alpha: manifest.alpha }),
              "antisolar.space": body.space,
              "antisolar.hash": String(manifest.hash),
            },
          }),
        ),
      };
    case "hdr": {
      const c = spacePrimaries(body.space);
      return {
        contentType: "image/vnd.radiance",
        headers: { ...headers, "x-antisolar-note": "Radiance RGBE has no alpha: the transmittance is in the manifest's v.transmittance" },
        body: encodeRadianceHdr({ width: lut.width, height: stackedHeight, data: rgbOnly(lut), primaries: [c.red, c.green, c.blue, c.white] }),
      };
    }
    case "png16": {
      // PNG holds 0..1: RGB are divided by the largest RGB value, which the header states.
      let peak = 0;
      for (let p = 0; p < lut.width * stackedHeight; p++) for (let k = 0; k < 3; k++) peak = Math.max(peak, lut.rgba[4 * p + k]);
      const scaled = Float32Array.from(lut.rgba, (v, k) => (k % 4 === 3 ? v : peak > 0 ? v / peak : 0));
      const png = await encodePngImage({ width: lut.width, height: stackedHeight, channels: 4, values: scaled, bitDepth: 16, space: body.space });
      return { contentType: "image/png", headers: { ...headers, "x-antisolar-scale": String(peak) }, body: png.png };
    }
  }
}
