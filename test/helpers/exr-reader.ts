// An OpenEXR reader written from the OpenEXR File Layout (and ZIP as OpenEXRCore internal_zip.c does it), sharing no
// code with pipeline/encoders: the tests read our files back with it.
import { expect } from "vitest";
import { inflateSync } from "node:zlib";

// ---- binary16 from its definition (IEEE 754-2008 §3.4, Table 3.5: bias 15, 10 fraction bits), sharing no code ----

export function halfValue(bits: number): number {
  const sign = bits & 0x8000 ? -1 : 1;
  const exponentField = (bits >> 10) & 0x1f;
  const fraction = bits & 0x3ff;
  if (exponentField === 0x1f) return fraction === 0 ? sign * Infinity : NaN;
  if (exponentField === 0) return sign * fraction * 2 ** -24;
  return sign * (1 + fraction / 1024) * 2 ** (exponentField - 15);
}

// ---- Independent OpenEXR reader (OpenEXR File Layout; ZIP per OpenEXRCore internal_zip.c), sharing no code ----

export interface Attribute {
  type: string;
  value: Buffer;
}
export interface ParsedExr {
  versionField: number;
  attributes: Map<string, Attribute>;
  headerEnd: number;
}
export interface ChannelEntry {
  name: string;
  pixelType: number;
  xSampling: number;
  ySampling: number;
}

function readCString(b: Buffer, at: number): [string, number] {
  const end = b.indexOf(0, at);
  return [b.toString("utf8", at, end), end + 1];
}

export function parseHeader(file: Buffer): ParsedExr {
  expect(file.readUInt32LE(0)).toBe(20000630);
  expect([...file.subarray(0, 4)]).toEqual([0x76, 0x2f, 0x31, 0x01]);
  const attributes = new Map<string, Attribute>();
  let at = 8;
  for (;;) {
    const [name, afterName] = readCString(file, at);
    if (name === "") return { versionField: file.readUInt32LE(4), attributes, headerEnd: afterName };
    expect(Buffer.byteLength(name)).toBeLessThanOrEqual(31);
    const [type, afterType] = readCString(file, afterName);
    const size = file.readInt32LE(afterType);
    attributes.set(name, { type, value: file.subarray(afterType + 4, afterType + 4 + size) });
    at = afterType + 4 + size;
  }
}

export function channelsOf(attr: Attribute): ChannelEntry[] {
  expect(attr.type).toBe("chlist");
  const out: ChannelEntry[] = [];
  let at = 0;
  for (;;) {
    const [name, next] = readCString(attr.value, at);
    if (name === "") {
      expect(next).toBe(attr.value.length);
      return out;
    }
    out.push({ name, pixelType: attr.value.readInt32LE(next), xSampling: attr.value.readInt32LE(next + 8), ySampling: attr.value.readInt32LE(next + 12) });
    expect([...attr.value.subarray(next + 4, next + 8)]).toEqual([0, 0, 0, 0]); // pLinear 0, reserved 0
    at = next + 16;
  }
}

export const int32s = (a: Attribute) => Array.from({ length: a.value.length / 4 }, (_, i) => a.value.readInt32LE(4 * i));
export const floats = (a: Attribute) => Array.from({ length: a.value.length / 4 }, (_, i) => a.value.readFloatLE(4 * i));

/** Inverse of the OpenEXR ZIP predictor and byte split (internal_zip.c: reconstruct, then interleave). */
function unzipBlock(packed: Buffer, rawSize: number): Buffer {
  if (packed.length === rawSize) return packed; // stored raw when deflate did not help
  const t = inflateSync(packed);
  expect(t.length).toBe(rawSize);
  for (let i = 1; i < t.length; i++) t[i] = (t[i - 1] + t[i] - 128) & 0xff;
  const out = Buffer.alloc(rawSize);
  const half = (rawSize + 1) >> 1;
  for (let i = 0; i < rawSize; i++) out[i] = i % 2 === 0 ? t[i >> 1] : t[half + (i >> 1)];
  return out;
}

export interface DecodedExr {
  header: ParsedExr;
  channels: ChannelEntry[];
  width: number;
  height: number;
  /** Per file channel: the raw sample bits (uint16 for half, uint32 for float), row-major. */
  planes: Map<string, Uint32Array>;
  packedSizes: number[];
}

const SAMPLE_BYTES: Record<number, number> = { 1: 2, 2: 4 };

/** Lines of (per channel, `width` samples) into per-channel planes. */
export function scatterLines(raw: Buffer, channels: ChannelEntry[], width: number, firstLine: number, lines: number, planes: Map<string, Uint32Array>): void {
  let at = 0;
  for (let y = firstLine; y < firstLine + lines; y++) {
    for (const c of channels) {
      const plane = planes.get(c.name)!;
      for (let x = 0; x < width; x++) {
        plane[y * width + x] = c.pixelType === 1 ? raw.readUInt16LE(at) : raw.readUInt32LE(at);
        at += SAMPLE_BYTES[c.pixelType];
      }
    }
  }
  expect(at).toBe(raw.length);
}

export function decodeScanlineExr(file: Buffer): DecodedExr {
  const header = parseHeader(file);
  expect(header.versionField).toBe(2); // version 2, no tiled/long-name/deep/multi-part flags
  const channels = channelsOf(header.attributes.get("channels")!);
  const [xMin, yMin, xMax, yMax] = int32s(header.attributes.get("dataWindow")!);
  const width = xMax - xMin + 1;
  const height = yMax - yMin + 1;
  const compression = header.attributes.get("compression")!.value[0];
  const linesPerBlock = compression === 3 ? 16 : 1;
  const blocks = Math.ceil(height / linesPerBlock);
  const planes = new Map(channels.map((c) => [c.name, new Uint32Array(width * height)]));
  const bytesPerLine = width * channels.reduce((s, c) => s + SAMPLE_BYTES[c.pixelType], 0);
  const packedSizes: number[] = [];
  let expectedOffset = header.headerEnd + 8 * blocks;
  for (let block = 0; block < blocks; block++) {
    const offset = Number(file.readBigUInt64LE(header.headerEnd + 8 * block));
    expect(offset).toBe(expectedOffset); // chunks follow the table in order, with no gaps
    const y = file.readInt32LE(offset);
    const size = file.readInt32LE(offset + 4);
    expect(y).toBe(yMin + block * linesPerBlock);
    const lines = Math.min(linesPerBlock, height - block * linesPerBlock);
    const packed = file.subarray(offset + 8, offset + 8 + size);
    const raw = compression === 3 ? unzipBlock(packed, lines * bytesPerLine) : packed;
    scatterLines(raw, channels, width, block * linesPerBlock, lines, planes);
    packedSizes.push(size);
    expectedOffset = offset + 8 + size;
  }
  expect(expectedOffset).toBe(file.length);
  return { header, channels, width, height, planes, packedSizes };
}

