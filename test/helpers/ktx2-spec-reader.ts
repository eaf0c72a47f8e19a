// A KTX 2.0 reader written for the tests from the Khronos specifications alone (KTX File Format Specification 2.0,
// "File Structure", "Level Index", "Data Format Descriptor", "Key/Value Data"; Khronos Data Format Specification
// 1.3, "Basic Data Format Descriptor Block"), independent of the library that writes our files.

/** «KTX 20»\r\n\x1A\n (KTX 2.0, "Identifier"). */
export const KTX2_IDENTIFIER = [0xab, 0x4b, 0x54, 0x58, 0x20, 0x32, 0x30, 0xbb, 0x0d, 0x0a, 0x1a, 0x0a];

export interface SpecSample {
  bitOffset: number;
  /** The bit length itself (the file stores it less one). */
  bitLength: number;
  channelId: number;
  /** The qualifier bits of channelType: 0x80 float, 0x40 signed, 0x20 exponent, 0x10 linear. */
  qualifiers: number;
  sampleLower: number;
  sampleUpper: number;
}

export interface SpecKtx2 {
  vkFormat: number;
  typeSize: number;
  pixelWidth: number;
  pixelHeight: number;
  pixelDepth: number;
  layerCount: number;
  faceCount: number;
  levelCount: number;
  supercompressionScheme: number;
  dfd: {
    vendorId: number;
    descriptorType: number;
    versionNumber: number;
    descriptorBlockSize: number;
    colorModel: number;
    colorPrimaries: number;
    transferFunction: number;
    flags: number;
    texelBlockDimension: number[];
    bytesPlane: number[];
    samples: SpecSample[];
  };
  /** Keys in file order, values as UTF-8 text without their terminating NUL. */
  keyValues: [string, string][];
  levels: { byteOffset: number; byteLength: number; uncompressedByteLength: number; data: Uint8Array }[];
}

export function readKtx2BySpec(bytes: Uint8Array): SpecKtx2 {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < 12; i++) if (bytes[i] !== KTX2_IDENTIFIER[i]) throw new Error(`not a KTX 2.0 file (identifier byte ${i})`);
  const u32 = (o: number) => view.getUint32(o, true);
  const u64 = (o: number) => Number(view.getBigUint64(o, true));
  const header = {
    vkFormat: u32(12),
    typeSize: u32(16),
    pixelWidth: u32(20),
    pixelHeight: u32(24),
    pixelDepth: u32(28),
    layerCount: u32(32),
    faceCount: u32(36),
    levelCount: u32(40),
    supercompressionScheme: u32(44),
  };
  const dfdByteOffset = u32(48);
  const dfdByteLength = u32(52);
  const kvdByteOffset = u32(56);
  const kvdByteLength = u32(60);
  const levels = [];
  for (let l = 0; l < Math.max(1, header.levelCount); l++) {
    const o = 80 + 24 * l;
    const byteOffset = u64(o);
    const byteLength = u64(o + 8);
    levels.push({ byteOffset, byteLength, uncompressedByteLength: u64(o + 16), data: bytes.subarray(byteOffset, byteOffset + byteLength) });
  }

  // The DFD starts with its total size, then the basic descriptor block.
  if (u32(dfdByteOffset) !== dfdByteLength) throw new Error("dfdTotalSize differs from dfdByteLength");
  const b = dfdByteOffset + 4;
  const word0 = u32(b);
  const word1 = u32(b + 4);
  const descriptorBlockSize = word1 >>> 16;
  const samples: SpecSample[] = [];
  for (let s = b + 24; s < b + descriptorBlockSize; s += 16) {
    const w = u32(s);
    const channelType = (w >>> 24) & 0xff;
    const signed = (channelType & 0x40) !== 0;
    samples.push({
      bitOffset: w & 0xffff,
      bitLength: ((w >>> 16) & 0xff) + 1,
      channelId: channelType & 0x0f,
      qualifiers: channelType & 0xf0,
      sampleLower: signed ? view.getInt32(s + 8, true) : u32(s + 8),
      sampleUpper: signed ? view.getInt32(s + 12, true) : u32(s + 12),
    });
  }
  const dfd = {
    vendorId: word0 & 0x1ffff,
    descriptorType: word0 >>> 17,
    versionNumber: word1 & 0xffff,
    descriptorBlockSize,
    colorModel: bytes[b + 8],
    colorPrimaries: bytes[b + 9],
    transferFunction: bytes[b + 10],
    flags: bytes[b + 11],
    texelBlockDimension: [0, 1, 2, 3].map((k) => bytes[b + 12 + k]),
    bytesPlane: [0, 1, 2, 3, 4, 5, 6, 7].map((k) => bytes[b + 16 + k]),
    samples,
  };

  const keyValues: [string, string][] = [];
  const decoder = new TextDecoder("utf-8", { fatal: true });
  for (let o = kvdByteOffset; o < kvdByteOffset + kvdByteLength; ) {
    const length = u32(o);
    const pair = bytes.subarray(o + 4, o + 4 + length);
    const nul = pair.indexOf(0);
    const value = pair.subarray(nul + 1);
    keyValues.push([decoder.decode(pair.subarray(0, nul)), decoder.decode(value[value.length - 1] === 0 ? value.subarray(0, -1) : value)]);
    o += 4 + length + ((4 - (length % 4)) % 4);
  }
  return { ...header, dfd, keyValues, levels };
}

/** An IEEE 754 binary16 pattern as a number (IEEE 754-2008 §3.4), decoded without the writer's code. */
export function halfToNumber(bits: number): number {
  const sign = bits & 0x8000 ? -1 : 1;
  const exponent = (bits >>> 10) & 0x1f;
  const fraction = bits & 0x3ff;
  if (exponent === 0) return sign * fraction * 2 ** -24;
  if (exponent === 31) return fraction ? NaN : sign * Infinity;
  return sign * (1 + fraction / 1024) * 2 ** (exponent - 15);
}
