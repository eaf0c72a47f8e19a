import sharp from "sharp";
import type { OutputSpaceId } from "../../lib/colour/output-spaces.js";
import { colourMetadataFor } from "./colour-signalling.js";
import { cicpChunk, iccpChunk, withColourChunks, type CicpCode, type PngChunk } from "./png-chunks.js";

export interface PngStripRequest {
  /** Interleaved RGB triples in `space`, one per angle sample (encoded for srgb/display-p3/rec2020, else linear). */
  readonly values: Float64Array;
  readonly height: number;
  readonly bitDepth: 8 | 16;
  readonly space: OutputSpaceId;
}

export interface PngStrip {
  readonly png: Buffer;
  readonly width: number;
  readonly height: number;
  /** Name of the embedded ICC profile (also the iCCP profile name). */
  readonly iccDescription: string;
  /** Code points written as cICP, or null when only the ICC profile describes the colours. */
  readonly cicp: CicpCode | null;
  /** Components outside [0, 1] that were clamped before quantising. */
  readonly clampedComponents: number;
  readonly notes: readonly string[];
}

/** sharp's default limitInputPixels (0x3FFF × 0x3FFF, per its documentation); larger raw inputs are refused. */
const MAX_PIXELS = 0x3fff * 0x3fff;

/**
 * One pixel column per sample and `height` identical rows. Codes are round(v·(2^bits − 1)) of v clamped to [0, 1]
 * (full-range coding: ITU-T H.273 VideoFullRangeFlag = 1).
 */
export async function encodePngStrip(req: PngStripRequest): Promise<PngStrip> {
  const { values, height } = req;
  if (values.length === 0 || values.length % 3 !== 0) throw new RangeError("values must hold a positive number of RGB triples");
  const width = values.length / 3;
  if (!Number.isInteger(height) || height < 1) throw new RangeError("height must be a positive integer");
  const pixels = new Float64Array(values.length * height);
  for (let y = 0; y < height; y++) pixels.set(values, y * values.length);
  return encodePngImage({ width, height, channels: 3, values: pixels, bitDepth: req.bitDepth, space: req.space });
}

export interface PngImageRequest {
  readonly width: number;
  readonly height: number;
  readonly channels: 3 | 4;
  /** Interleaved samples, row-major from the top row: encoded or linear values in `space`, alpha linear. */
  readonly values: ArrayLike<number>;
  readonly bitDepth: 8 | 16;
  readonly space: OutputSpaceId;
  /**
   * Adds a 4×4 ordered (Bayer) dither of ±½ code before rounding, so that 8-bit previews of smooth gradients
   * do not band (Bayer 1973 threshold matrix).
   */
  readonly dither?: boolean;
}

const BAYER_4 = [0, 8, 2, 10, 12, 4, 14, 6, 3, 11, 1, 9, 15, 7, 13, 5];

/** A 2-D RGB or RGBA PNG with the space's ICC profile (and cICP where the space has code points). */
export async function encodePngImage(req: PngImageRequest): Promise<PngStrip> {
  const { width, height, channels, values, bitDepth, space } = req;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1 || width * height > MAX_PIXELS) {
    throw new RangeError(`width and height must be positive integers and the image at most ${MAX_PIXELS} pixels`);
  }
  if (values.length !== width * height * channels) throw new RangeError("values must hold width × height × channels samples");
  if (bitDepth !== 8 && bitDepth !== 16) throw new RangeError("bitDepth must be 8 or 16");

  const maxCode = 2 ** bitDepth - 1;
  const codes = bitDepth === 8 ? new Uint8Array(values.length) : new Uint16Array(values.length);
  let clampedComponents = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (Number.isNaN(v)) throw new RangeError(`value ${i} is NaN`);
    if (v < 0 || v > 1) clampedComponents++;
    let code = Math.min(1, Math.max(0, v)) * maxCode;
    if (req.dither) {
      const pixel = Math.floor(i / channels);
      const x = pixel % width;
      const y = Math.floor(pixel / width);
      code += (BAYER_4[(y % 4) * 4 + (x % 4)] + 0.5) / 16 - 0.5;
    }
    codes[i] = Math.min(maxCode, Math.max(0, Math.round(code)));
  }

  let image = sharp(codes, { raw: { width, height, channels } });
  // A Uint16Array is read as 'ushort'; 'rgb16' keeps the PNG writer at 16 bits per sample.
  if (bitDepth === 16) image = image.toColourspace("rgb16");
  const plain = await image.png({ compressionLevel: 6, palette: false }).toBuffer();

  const meta = colourMetadataFor(space);
  const notes = meta.note ? [meta.note] : [];
  if (clampedComponents > 0) notes.push(`${clampedComponents} components outside 0..1 were clamped for PNG.`);
  return {
    png: withSpaceColourChunks(plain, space),
    width,
    height,
    iccDescription: meta.iccDescription,
    cicp: meta.cicp,
    clampedComponents,
    notes,
  };
}

/** Adds the space's cICP (where it has code points) and ICC profile chunks to a PNG that sharp wrote. */
export function withSpaceColourChunks(plain: Buffer, space: OutputSpaceId): Buffer {
  const meta = colourMetadataFor(space);
  const added: PngChunk[] = [];
  if (meta.cicp) added.push(cicpChunk(meta.cicp));
  added.push(iccpChunk(meta.iccDescription, meta.profile));
  return withColourChunks(plain, added);
}
