/**
 * Radiance picture (.hdr) writer: RGBE pixels (Ward, "Real Pixels", Graphics Gems II, 1991) laid out as
 * the Radiance reference manual's "File Formats" chapter gives it: text header, blank line, resolution
 * string, scan lines from the top.
 */

export type XyChromaticity = readonly [x: number, y: number];

export interface RadianceImage {
  readonly width: number;
  readonly height: number;
  /** Linear RGB, row-major from the top row, 3 samples per pixel. Negative samples are written as 0. */
  readonly data: Float32Array;
  /** Written as EXPOSURE=; Radiance readers divide pixel values by it to recover radiance. */
  readonly exposure?: number;
  /** Red, green, blue and white chromaticities, written as PRIMARIES=. */
  readonly primaries?: readonly [XyChromaticity, XyChromaticity, XyChromaticity, XyChromaticity];
}

/** Mantissa bits of each RGBE byte. */
const MANTISSA_BITS = 8;
const EXPONENT_BIAS = 128;
/** Exponent byte 0 is reserved for black, so the smallest stored exponent is −127 and the largest 127. */
const MIN_EXPONENT = 1 - EXPONENT_BIAS;
const MAX_EXPONENT = 255 - EXPONENT_BIAS;
/** Widths the new-style run-length scan lines can announce (Radiance color.c, MINELEN 8 and MAXELEN 0x7fff). */
const MIN_RLE_WIDTH = 8;
const MAX_RLE_WIDTH = 0x7fff;
/** Shortest run worth a run code (Radiance color.c MINRUN); a run byte codes 1..127 repeats, a dump 1..128 literals. */
const MIN_RUN = 4;
const MAX_RUN = 127;
const MAX_DUMP = 128;

/**
 * Shared-exponent coding: with max(r,g,b) = m·2^e, 0.5 ≤ m < 1, each byte is ⌊c·2^(8−e)⌋ and the
 * fourth byte e + 128 (Ward 1991). Values below 2^−128 become black, as Radiance's own 1e−32 cut-off does.
 */
export function rgbeFromRgb(red: number, green: number, blue: number): [number, number, number, number] {
  for (const c of [red, green, blue]) if (!Number.isFinite(c)) throw new RangeError("Radiance RGBE cannot store NaN or Infinity");
  const r = Math.max(red, 0);
  const g = Math.max(green, 0);
  const b = Math.max(blue, 0);
  const largest = Math.max(r, g, b);
  if (largest < 2 ** (MIN_EXPONENT - 1)) return [0, 0, 0, 0];
  let exponent = Math.floor(Math.log2(largest)) + 1;
  // log2 can be off by one next to powers of two; pin 2^(e−1) ≤ largest < 2^e exactly.
  if (2 ** (exponent - 1) > largest) exponent -= 1;
  else if (2 ** exponent <= largest) exponent += 1;
  if (exponent > MAX_EXPONENT) throw new RangeError(`Radiance RGBE cannot store ${largest} (limit 2^${MAX_EXPONENT})`);
  const scale = 2 ** (MANTISSA_BITS - exponent);
  return [Math.floor(r * scale), Math.floor(g * scale), Math.floor(b * scale), exponent + EXPONENT_BIAS];
}

function header(image: RadianceImage): string {
  const lines = ["#?RADIANCE", "FORMAT=32-bit_rle_rgbe"];
  if (image.exposure !== undefined) {
    if (!(image.exposure > 0 && Number.isFinite(image.exposure))) throw new RangeError("EXPOSURE must be positive and finite");
    lines.push(`EXPOSURE=${image.exposure}`);
  }
  if (image.primaries) lines.push(`PRIMARIES=${image.primaries.flat().join(" ")}`);
  return `${lines.join("\n")}\n\n-Y ${image.height} +X ${image.width}\n`;
}

/** Runs of ≥ MIN_RUN equal bytes become (128 + n, byte); everything between goes out as (n, n literal bytes). */
function runLengthEncode(bytes: Uint8Array, out: number[]): void {
  let next = 0;
  while (next < bytes.length) {
    let runStart = next;
    let runLength = 0;
    while (runStart < bytes.length) {
      runLength = 1;
      while (runStart + runLength < bytes.length && runLength < MAX_RUN && bytes[runStart + runLength] === bytes[runStart]) runLength++;
      if (runLength >= MIN_RUN) break;
      runStart += runLength;
    }
    while (next < runStart) {
      const count = Math.min(MAX_DUMP, runStart - next);
      out.push(count);
      for (let i = next; i < next + count; i++) out.push(bytes[i]);
      next += count;
    }
    if (runStart < bytes.length) {
      out.push(128 + runLength, bytes[runStart]);
      next = runStart + runLength;
    }
  }
}

export function encodeRadianceHdr(image: RadianceImage): Buffer {
  const { width, height, data } = image;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new RangeError("Radiance picture width and height must be positive integers");
  }
  if (data.length !== width * height * 3) throw new RangeError(`Radiance data holds ${data.length} samples, expected ${width * height * 3}`);

  const runLength = width >= MIN_RLE_WIDTH && width <= MAX_RLE_WIDTH;
  const body: number[] = [];
  const planes = [0, 1, 2, 3].map(() => new Uint8Array(width));
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const at = 3 * (y * width + x);
      const rgbe = rgbeFromRgb(data[at], data[at + 1], data[at + 2]);
      // Flat pixels cannot be mistaken for old-style repeat codes (1,1,1,n): a non-black pixel's largest byte is ≥ 128.
      if (runLength) for (let c = 0; c < 4; c++) planes[c][x] = rgbe[c];
      else body.push(...rgbe);
    }
    if (runLength) {
      // New-style scan line: 2, 2, width high byte, width low byte, then each component's run-length stream.
      body.push(2, 2, width >> 8, width & 0xff);
      for (const plane of planes) runLengthEncode(plane, body);
    }
  }
  return Buffer.concat([Buffer.from(header(image), "latin1"), Buffer.from(body)]);
}
