import { deflateSync } from "node:zlib";

/**
 * OpenEXR ZIP / ZIPS block coding, as the OpenEXR library does it (OpenEXRCore internal_zip.c,
 * internal_zip_deconstruct_bytes): even-indexed bytes go to the first half, odd-indexed to the
 * second; then each byte after the first becomes (t[i] − t[i−1] + 128) mod 256; then zlib deflate.
 * The library stores the raw block when deflate does not make it smaller (apply_zip_impl), and
 * readers recognise that case by packed size = unpacked size, so we do the same.
 */
export function zipExrBlock(raw: Uint8Array): Buffer {
  const count = raw.length;
  const split = new Uint8Array(count);
  const secondHalf = (count + 1) >> 1;
  for (let i = 0; i < count; i++) split[(i & 1) === 0 ? i >> 1 : secondHalf + (i >> 1)] = raw[i];
  const predicted = new Uint8Array(count);
  if (count > 0) predicted[0] = split[0];
  for (let i = 1; i < count; i++) predicted[i] = (split[i] - split[i - 1] + 128) & 0xff;
  const deflated = deflateSync(predicted);
  return deflated.length < count ? deflated : Buffer.from(raw);
}
