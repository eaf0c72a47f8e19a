import {
  box2iAttribute,
  channelListAttribute,
  chromaticitiesAttribute,
  compressionAttribute,
  floatAttribute,
  increasingYAttribute,
  LINES_PER_BLOCK,
  PIXEL_TYPE_BYTES,
  serializeAttribute,
  stringAttribute,
  v2fAttribute,
  type EncodedAttribute,
  type ExrChannelName,
  type ExrChromaticities,
  type ExrCompression,
  type ExrPixelType,
} from "./exr-attributes.js";
import { zipExrBlock } from "./exr-zip.js";
import { halfBitsFromNumber } from "./half-float.js";

export type { ExrChannelName, ExrChromaticities, ExrCompression, ExrPixelType } from "./exr-attributes.js";

export interface ExrImage {
  readonly width: number;
  readonly height: number;
  /** Order of the interleaved samples in `data`; the file stores them alphabetically, as OpenEXR requires. */
  readonly channels: readonly ExrChannelName[];
  /** Linear values, row-major from the top row, `channels.length` samples per pixel. */
  readonly data: Float32Array;
  readonly pixelType: ExrPixelType;
  readonly compression: ExrCompression;
  readonly chromaticities?: ExrChromaticities;
  /** Extra string attributes, e.g. comments, owner, "antisolar:space". */
  readonly attributes?: Readonly<Record<string, string>>;
}

/** First four bytes: 20000630 as int32 little-endian (OpenEXR File Layout, "Magic Number"). */
const MAGIC = 20000630;
/** Version 2, no flags: single-part scan-line file with short names (OpenEXR File Layout, "Version Field"). */
const VERSION_FIELD = 2;
const BYTES_PER_OFFSET = 8;
const CHUNK_PREFIX_BYTES = 8; // int32 y, int32 packed size

/** Names the encoder writes, plus the structural ones a reader would take as layout (tiles, type, multi-part). */
const RESERVED_NAMES = new Set([
  "channels", "compression", "dataWindow", "displayWindow", "lineOrder", "pixelAspectRatio",
  "screenWindowCenter", "screenWindowWidth", "chromaticities", "tiles", "type", "name", "version", "chunkCount",
]);

function checkImage(image: ExrImage): void {
  const { width, height, channels, data } = image;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new RangeError("EXR width and height must be positive integers");
  }
  if (channels.length === 0 || new Set(channels).size !== channels.length) {
    throw new RangeError("EXR channels must be a non-empty list without repeats");
  }
  for (const name of channels) {
    // Without the long-names flag (version field) names are at most 31 bytes (OpenEXR File Layout, "Version Field").
    if (!/^[\x21-\x7e]{1,31}$/.test(name)) throw new RangeError(`EXR channel name ${JSON.stringify(name)} must be 1 to 31 printable ASCII characters`);
  }
  if (data.length !== width * height * channels.length) {
    throw new RangeError(`EXR data holds ${data.length} samples, expected ${width * height * channels.length}`);
  }
  for (const name of Object.keys(image.attributes ?? {})) {
    if (RESERVED_NAMES.has(name)) throw new RangeError(`EXR attribute ${name} is reserved`);
  }
}

function headerAttributes(image: ExrImage, sortedChannels: readonly ExrChannelName[]): EncodedAttribute[] {
  const { width, height } = image;
  const list = [
    channelListAttribute(sortedChannels, image.pixelType),
    compressionAttribute(image.compression),
    box2iAttribute("dataWindow", 0, 0, width - 1, height - 1),
    box2iAttribute("displayWindow", 0, 0, width - 1, height - 1),
    increasingYAttribute(),
    floatAttribute("pixelAspectRatio", 1),
    v2fAttribute("screenWindowCenter", 0, 0),
    floatAttribute("screenWindowWidth", 1),
  ];
  if (image.chromaticities) list.push(chromaticitiesAttribute(image.chromaticities));
  for (const [name, text] of Object.entries(image.attributes ?? {})) list.push(stringAttribute(name, text));
  // The OpenEXR library keeps attributes sorted by name; readers accept any order.
  return list.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
}

/** Lines firstLine..lastLine, each holding every channel's row in file order (OpenEXR File Layout, "Scan Line Blocks"). */
function packLines(image: ExrImage, sourceIndexOfFileChannel: readonly number[], firstLine: number, lineCount: number): Buffer {
  const { width, channels, data, pixelType } = image;
  const sampleBytes = PIXEL_TYPE_BYTES[pixelType];
  const out = Buffer.alloc(lineCount * width * channels.length * sampleBytes);
  let at = 0;
  for (let y = firstLine; y < firstLine + lineCount; y++) {
    for (const source of sourceIndexOfFileChannel) {
      for (let x = 0; x < width; x++) {
        const value = data[(y * width + x) * channels.length + source];
        at = pixelType === "half" ? out.writeUInt16LE(halfBitsFromNumber(value), at) : out.writeFloatLE(value, at);
      }
    }
  }
  return out;
}

/** Single-part scan-line file (OpenEXR File Layout): magic, version, header, line offset table, then the chunks in order. */
export function encodeExr(image: ExrImage): Buffer {
  checkImage(image);
  const sortedChannels = [...image.channels].sort();
  const sourceIndex = sortedChannels.map((name) => image.channels.indexOf(name));

  const prefix = Buffer.alloc(8);
  prefix.writeInt32LE(MAGIC, 0);
  prefix.writeInt32LE(VERSION_FIELD, 4);
  const header = Buffer.concat([...headerAttributes(image, sortedChannels).map(serializeAttribute), Buffer.from([0])]);

  const linesPerBlock = LINES_PER_BLOCK[image.compression];
  const blockCount = Math.ceil(image.height / linesPerBlock);
  const offsets = Buffer.alloc(blockCount * BYTES_PER_OFFSET);
  const chunks: Buffer[] = [];
  let position = prefix.length + header.length + offsets.length;
  for (let block = 0; block < blockCount; block++) {
    const firstLine = block * linesPerBlock;
    const raw = packLines(image, sourceIndex, firstLine, Math.min(linesPerBlock, image.height - firstLine));
    const packed = image.compression === "zip" ? zipExrBlock(raw) : raw;
    const chunkPrefix = Buffer.alloc(CHUNK_PREFIX_BYTES);
    chunkPrefix.writeInt32LE(firstLine, 0);
    chunkPrefix.writeInt32LE(packed.length, 4);
    offsets.writeBigUInt64LE(BigInt(position), block * BYTES_PER_OFFSET);
    chunks.push(chunkPrefix, packed);
    position += CHUNK_PREFIX_BYTES + packed.length;
  }
  return Buffer.concat([prefix, header, offsets, ...chunks]);
}
