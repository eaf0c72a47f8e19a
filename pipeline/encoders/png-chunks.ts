import { crc32, deflateSync } from "node:zlib";

/** PNG signature and chunk layout: W3C PNG (Third Edition) §5.2, §5.3. */
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

export interface PngChunk {
  readonly type: string;
  readonly data: Buffer;
}

export function readPngChunks(png: Buffer): PngChunk[] {
  if (png.length < PNG_SIGNATURE.length || !png.subarray(0, 8).equals(PNG_SIGNATURE)) throw new Error("not a PNG stream");
  const chunks: PngChunk[] = [];
  let at = PNG_SIGNATURE.length;
  while (at < png.length) {
    const length = png.readUInt32BE(at);
    const type = png.toString("latin1", at + 4, at + 8);
    chunks.push({ type, data: png.subarray(at + 8, at + 8 + length) });
    at += 12 + length;
  }
  return chunks;
}

/** Length, type, data, CRC-32 over type and data (PNG §5.3; CRC per ISO 3309 as PNG Annex D gives it). */
export function writePngChunks(chunks: readonly PngChunk[]): Buffer {
  const parts: Buffer[] = [PNG_SIGNATURE];
  for (const { type, data } of chunks) {
    const head = Buffer.alloc(8);
    head.writeUInt32BE(data.length, 0);
    head.write(type, 4, "latin1");
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(crc32(data, crc32(head.subarray(4))), 0);
    parts.push(head, data, crc);
  }
  return Buffer.concat(parts);
}

/** iCCP: profile name (1–79 Latin-1 bytes), NUL, compression method 0, zlib stream (PNG §11.3.2.3). */
export function iccpChunk(profileName: string, profile: Buffer): PngChunk {
  const name = Buffer.from(profileName, "latin1");
  if (name.length < 1 || name.length > 79 || name.toString("latin1") !== profileName) {
    throw new RangeError("iCCP profile name must be 1 to 79 Latin-1 characters");
  }
  return { type: "iCCP", data: Buffer.concat([name, Buffer.from([0, 0]), deflateSync(profile)]) };
}

/** Coding-independent code points (ITU-T H.273) carried by cICP, PNG Third Edition §11.3.2.6. */
export interface CicpCode {
  readonly colourPrimaries: number;
  readonly transferCharacteristics: number;
  /** 0 (identity): PNG holds RGB, never YCbCr. */
  readonly matrixCoefficients: 0;
  readonly videoFullRangeFlag: 0 | 1;
}

export function cicpChunk(code: CicpCode): PngChunk {
  return {
    type: "cICP",
    data: Buffer.from([code.colourPrimaries, code.transferCharacteristics, code.matrixCoefficients, code.videoFullRangeFlag]),
  };
}

/** Chunks that describe colour and would contradict (or be overridden by) the ones we add. */
const COLOUR_CHUNK_TYPES = new Set(["cICP", "iCCP", "sRGB", "gAMA", "cHRM"]);

/** Replaces any colour chunks with `added`, placed straight after IHDR (so before PLTE and IDAT, as §5.6 requires). */
export function withColourChunks(png: Buffer, added: readonly PngChunk[]): Buffer {
  const chunks = readPngChunks(png);
  if (chunks[0]?.type !== "IHDR") throw new Error("PNG stream must start with IHDR");
  const rest = chunks.slice(1).filter((c) => !COLOUR_CHUNK_TYPES.has(c.type));
  return writePngChunks([chunks[0], ...added, ...rest]);
}
