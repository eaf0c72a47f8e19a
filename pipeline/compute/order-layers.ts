// Images and textures by scattering order: the combined channels, each named order's RGB and the remainder,
// interleaved for a multi-layer OpenEXR (channels "layer.R", OpenEXR Technical Introduction, "Layers").

import { ORDER_LAYERS, REMAINDER_LAYER } from "../../lib/bow/scattering-orders.js";
import type { OrderLayersManifest } from "../../schemas/responses/order-layers-response.js";

/** The layers in file order of meaning: the named orders, then the remainder. */
export const LAYER_NAMES = [...ORDER_LAYERS.map((layer) => layer.name), REMAINDER_LAYER.name];

const RGB = ["R", "G", "B"] as const;

/** Pixels above this are refused by order: 19 float channels of 2,097,152 pixels are 160 MB before encoding. */
export const MAX_LAYERED_PIXELS = 2048 * 1024;

/** Channel names of whole (combined) channels and the layers, as the EXR encoder takes them (it sorts them). */
export function layeredChannels(wholeChannels: readonly string[]): string[] {
  return [...wholeChannels, ...LAYER_NAMES.flatMap((name) => RGB.map((c) => `${name}.${c}`))];
}

/**
 * The combined samples (wholeChannels per pixel, R, G, B first) interleaved with each named order's RGB (parts, in
 * ORDER_LAYERS' order, 3 per pixel) and the remainder = combined − Σ parts, so that the layers add up to the
 * combined RGB exactly before the file's rounding.
 */
export function withOrderLayers(whole: Float32Array, wholeChannels: readonly string[], parts: readonly Float32Array[], pixels: number): { channels: string[]; data: Float32Array } {
  if (parts.length !== ORDER_LAYERS.length) throw new RangeError(`expected ${ORDER_LAYERS.length} order layers, got ${parts.length}`);
  const channels = layeredChannels(wholeChannels);
  const stride = channels.length;
  const w = wholeChannels.length;
  const data = new Float32Array(pixels * stride);
  for (let p = 0; p < pixels; p++) {
    const at = p * stride;
    for (let k = 0; k < w; k++) data[at + k] = whole[p * w + k];
    for (let c = 0; c < 3; c++) {
      let sum = 0;
      parts.forEach((part, o) => {
        const v = part[3 * p + c];
        data[at + w + 3 * o + c] = v;
        sum += v;
      });
      data[at + w + 3 * parts.length + c] = whole[p * w + c] - sum;
    }
  }
  return { channels, data };
}

/** What the manifest says about the layers of the file. */
export function orderLayersManifest(wholeChannels: readonly string[]): OrderLayersManifest {
  const layers = [...ORDER_LAYERS, REMAINDER_LAYER].map((layer) => ({ name: layer.name, channels: RGB.map((c) => `${layer.name}.${c}`), meaning: layer.meaning }));
  return {
    kind: "by-order",
    channels: layeredChannels(wholeChannels).sort(),
    layers,
    sum: `R = ${LAYER_NAMES.map((n) => `${n}.R`).join(" + ")} (and so for G, B), up to the rounding of each stored sample; alpha (A) belongs to the combined image only`,
    model:
      "orders from the Debye series of the Lorenz–Mie coefficients for drops on the Lorenz–Mie engine (van de Hulst 1957 §12.1; Hovenac & Lock 1992), " +
      "from the ray-optics and Airy (uniform caustic) engines order by order for larger drops; each order rendered with the combined image's scale and colour handling",
  };
}
