/**
 * Header attribute encoding of OpenEXR (OpenEXR File Layout, "Header" and "Predefined Attribute
 * Types"): name NUL, type name NUL, int32 size, value; all numbers little-endian.
 */

/** A channel name: "R", "G", "B", "A", or a layer's channel "layer.R" (OpenEXR Technical Introduction, "Layers"). */
export type ExrChannelName = string;
export type ExrPixelType = "half" | "float";
export type ExrCompression = "none" | "zip";
export type XyChromaticity = readonly [x: number, y: number];

export interface ExrChromaticities {
  readonly red: XyChromaticity;
  readonly green: XyChromaticity;
  readonly blue: XyChromaticity;
  readonly white: XyChromaticity;
}

/** pixelType enum of the chlist attribute: UINT 0, HALF 1, FLOAT 2. */
export const PIXEL_TYPE_CODE: Record<ExrPixelType, number> = { half: 1, float: 2 };
export const PIXEL_TYPE_BYTES: Record<ExrPixelType, number> = { half: 2, float: 4 };
/** compression enum: NO 0, RLE 1, ZIPS 2, ZIP 3, … */
export const COMPRESSION_CODE: Record<ExrCompression, number> = { none: 0, zip: 3 };
/** Scan lines per chunk: 1 uncompressed, 16 for ZIP (OpenEXR Technical Introduction, "Data Compression"). */
export const LINES_PER_BLOCK: Record<ExrCompression, number> = { none: 1, zip: 16 };
/** Without the long-names flag, attribute and type names are at most 31 bytes (OpenEXR File Layout, "Version Field"). */
export const MAX_NAME_BYTES = 31;

export interface EncodedAttribute {
  readonly name: string;
  readonly type: string;
  readonly value: Buffer;
}

function int32s(...values: number[]): Buffer {
  const out = Buffer.alloc(4 * values.length);
  values.forEach((v, i) => out.writeInt32LE(v, 4 * i));
  return out;
}

function float32s(...values: number[]): Buffer {
  const out = Buffer.alloc(4 * values.length);
  values.forEach((v, i) => out.writeFloatLE(v, 4 * i));
  return out;
}

/** chlist: per channel name NUL, int32 pixelType, uint8 pLinear, 3 reserved bytes, int32 xSampling, int32 ySampling; then NUL. */
export function channelListAttribute(sortedNames: readonly ExrChannelName[], pixelType: ExrPixelType): EncodedAttribute {
  const parts: Buffer[] = [];
  for (const name of sortedNames) {
    parts.push(Buffer.from(`${name}\0`, "latin1"), int32s(PIXEL_TYPE_CODE[pixelType]), Buffer.from([0, 0, 0, 0]), int32s(1, 1));
  }
  parts.push(Buffer.from([0]));
  return { name: "channels", type: "chlist", value: Buffer.concat(parts) };
}

export const compressionAttribute = (compression: ExrCompression): EncodedAttribute => ({
  name: "compression",
  type: "compression",
  value: Buffer.from([COMPRESSION_CODE[compression]]),
});

export const box2iAttribute = (name: string, xMin: number, yMin: number, xMax: number, yMax: number): EncodedAttribute => ({
  name,
  type: "box2i",
  value: int32s(xMin, yMin, xMax, yMax),
});

/** lineOrder enum: INCREASING_Y 0. */
export const increasingYAttribute = (): EncodedAttribute => ({ name: "lineOrder", type: "lineOrder", value: Buffer.from([0]) });

export const floatAttribute = (name: string, value: number): EncodedAttribute => ({ name, type: "float", value: float32s(value) });

export const v2fAttribute = (name: string, x: number, y: number): EncodedAttribute => ({ name, type: "v2f", value: float32s(x, y) });

/** chromaticities: redX, redY, greenX, greenY, blueX, blueY, whiteX, whiteY as float. */
export const chromaticitiesAttribute = (c: ExrChromaticities): EncodedAttribute => ({
  name: "chromaticities",
  type: "chromaticities",
  value: float32s(...c.red, ...c.green, ...c.blue, ...c.white),
});

/** string: size bytes of text with no terminator; we write UTF-8 (common practice). */
export const stringAttribute = (name: string, text: string): EncodedAttribute => ({ name, type: "string", value: Buffer.from(text, "utf8") });

export function serializeAttribute({ name, type, value }: EncodedAttribute): Buffer {
  for (const label of [name, type]) {
    const length = Buffer.byteLength(label, "utf8");
    if (length < 1 || length > MAX_NAME_BYTES || label.includes("\0")) {
      throw new RangeError(`EXR attribute or type name must be 1 to ${MAX_NAME_BYTES} bytes without NUL: ${JSON.stringify(label)}`);
    }
  }
  const size = Buffer.alloc(4);
  size.writeInt32LE(value.length, 0);
  return Buffer.concat([Buffer.from(`${name}\0${type}\0`, "utf8"), size, value]);
}
