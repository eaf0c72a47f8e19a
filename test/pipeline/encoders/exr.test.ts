import { describe, it, expect } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { encodeExr, type ExrChannelName, type ExrCompression, type ExrPixelType } from "../../../pipeline/encoders/exr.js";
import { halfBitsFromNumber } from "../../../pipeline/encoders/half-float.js";
import { programRuns, skipWithout } from "../../helpers/tools.js";
import { decodeScanlineExr, floats, halfValue, int32s, parseHeader, channelsOf, scatterLines } from "../../helpers/exr-reader.js";

const LARGEST_FINITE_HALF_BITS = 0x7bff;

/**
 * Nearest binary16, ties to the even bit pattern (IEEE 754-2008 §4.3.1), found by bisection over the
 * finite positive patterns, whose values grow with the pattern. Finite values past 65504 clamp to
 * 65504: the encoder's documented choice, not IEEE's overflow to infinity.
 */
function referenceHalfBits(x: number): number {
  if (Number.isNaN(x)) return 0x7e00;
  const sign = x < 0 || Object.is(x, -0) ? 0x8000 : 0;
  const a = Math.abs(x);
  if (a === Infinity) return sign | 0x7c00;
  if (a >= halfValue(LARGEST_FINITE_HALF_BITS)) return sign | LARGEST_FINITE_HALF_BITS;
  let lo = 0;
  let hi = LARGEST_FINITE_HALF_BITS;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (halfValue(mid) <= a) lo = mid;
    else hi = mid;
  }
  const midpoint = (halfValue(lo) + halfValue(hi)) / 2;
  if (a < midpoint) return sign | lo;
  if (a > midpoint) return sign | hi;
  return sign | (lo % 2 === 0 ? lo : hi);
}

describe("binary16 conversion", () => {
  it("gives the IEEE 754-2008 binary16 bit patterns of well-known values", () => {
    // Patterns worked by hand from the §3.4 layout (sign | exponent+15 | fraction·1024).
    const cases: Array<[number, number]> = [
      [1, 0x3c00],
      [65504, 0x7bff],
      [2 ** -14, 0x0400],
      [2 ** -24, 0x0001],
      [0.1, 0x2e66],
      [-2, 0xc000],
      [0, 0x0000],
      [-0, 0x8000],
      [0.5, 0x3800],
      [Infinity, 0x7c00],
      [-Infinity, 0xfc00],
    ];
    for (const [value, bits] of cases) expect(halfBitsFromNumber(value), `${value}`).toBe(bits);
    const nan = halfBitsFromNumber(NaN);
    expect(nan & 0x7c00).toBe(0x7c00);
    expect(nan & 0x3ff).not.toBe(0);
  });

  it("round-trips every finite binary16 value and rounds every midpoint to even (exhaustive)", () => {
    const wrong: string[] = [];
    for (let bits = 0; bits <= LARGEST_FINITE_HALF_BITS; bits++) {
      const v = halfValue(bits);
      if (halfBitsFromNumber(v) !== bits) wrong.push(`value ${v}`);
      if (halfBitsFromNumber(-v) !== (bits | 0x8000)) wrong.push(`value ${-v}`);
      if (bits === LARGEST_FINITE_HALF_BITS) continue;
      const midpoint = (v + halfValue(bits + 1)) / 2;
      const even = bits % 2 === 0 ? bits : bits + 1;
      if (halfBitsFromNumber(midpoint) !== even) wrong.push(`midpoint ${midpoint}`);
      if (halfBitsFromNumber(midpoint * (1 + 2 ** -40)) !== bits + 1) wrong.push(`above ${midpoint}`);
      if (halfBitsFromNumber(midpoint * (1 - 2 ** -40)) !== bits) wrong.push(`below ${midpoint}`);
    }
    expect(wrong.slice(0, 10)).toEqual([]);
  });

  it("rounds subnormals and the underflow boundary to nearest-even", () => {
    expect(halfBitsFromNumber(2 ** -25)).toBe(0x0000); // halfway between 0 and 2^-24: even is 0
    expect(halfBitsFromNumber(2 ** -25 * (1 + 2 ** -30))).toBe(0x0001);
    expect(halfBitsFromNumber(3 * 2 ** -25)).toBe(0x0002); // 1.5 ULP: even is 2
    expect(halfBitsFromNumber(-(2 ** -26))).toBe(0x8000);
    expect(halfBitsFromNumber(1e-300)).toBe(0x0000);
  });

  it("rounds once, from the double, not via binary32", () => {
    // 1 + 2^-11 + 2^-40 lies above the midpoint of 1 and 1 + 2^-10; binary32 would first round it onto the midpoint.
    expect(halfBitsFromNumber(1 + 2 ** -11 + 2 ** -40)).toBe(0x3c01);
  });

  it("clamps finite overflow to ±65504 (documented choice; IEEE would give infinity from 65520 up)", () => {
    expect(halfBitsFromNumber(65519.99)).toBe(0x7bff);
    expect(halfBitsFromNumber(65520)).toBe(0x7bff);
    expect(halfBitsFromNumber(1e10)).toBe(0x7bff);
    expect(halfBitsFromNumber(-1e10)).toBe(0xfbff);
  });
});

// ---- Invented test images ----

/** Deterministic pseudo-random numbers in [0, 1) (32-bit LCG 1664525, 1013904223: Press et al. 1992, Numerical Recipes in C §7.1). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

const SPECIALS = [0, -0, NaN, Infinity, -Infinity, 70000, -3.25, 2 ** -20, 65519, 1e-9];

/** Smooth gradients per channel (so ZIP has something to squeeze), a noisy band, and special values in row 0. */
function testImage(width: number, height: number, channels: readonly ExrChannelName[], seed = 7): Float32Array {
  const random = lcg(seed);
  const data = new Float32Array(width * height * channels.length);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      for (let c = 0; c < channels.length; c++) {
        const i = (y * width + x) * channels.length + c;
        const smooth = (c + 1) * (x / width) * 4 + y / height + "RGBA".indexOf(channels[c]) * 10;
        data[i] = y % 5 === 3 ? random() * 2e4 : smooth;
      }
    }
  }
  SPECIALS.forEach((v, k) => (data[k] = v));
  return data;
}

function expectPlanesMatch(planes: Map<string, Uint32Array>, input: Float32Array, channels: readonly ExrChannelName[], pixelType: ExrPixelType): void {
  const f32 = new Float32Array(1);
  const u32 = new Uint32Array(f32.buffer);
  const mismatches: string[] = [];
  channels.forEach((name, c) => {
    const plane = planes.get(name)!;
    for (let p = 0; p < plane.length; p++) {
      const x = input[p * channels.length + c];
      let got: number;
      let want: number;
      if (pixelType === "half") {
        got = plane[p];
        want = referenceHalfBits(x);
        if (Number.isNaN(x)) [got, want] = [Number(Number.isNaN(halfValue(got))), 1];
      } else {
        f32[0] = x;
        want = u32[0];
        got = plane[p];
        if (Number.isNaN(x)) {
          u32[0] = got;
          [got, want] = [Number(Number.isNaN(f32[0])), 1];
        }
      }
      if (got !== want && mismatches.length < 5) mismatches.push(`${name}[${p}] input ${x}: got ${got} want ${want}`);
    }
  });
  expect(mismatches).toEqual([]);
}

const CHROMATICITIES = { red: [0.64, 0.33], green: [0.3, 0.6], blue: [0.15, 0.06], white: [0.3127, 0.329] } as const;
const COMBINATIONS = (["half", "float"] as const).flatMap((pixelType) =>
  (["none", "zip"] as const).flatMap((compression) =>
    ([["R", "G", "B"], ["B", "R", "A", "G"]] as const).map((channels) => ({ pixelType, compression, channels: [...channels] as ExrChannelName[] })),
  ),
);
const W = 45;
const H = 37; // not a multiple of 16: the last ZIP block is short

function writeCombination(pixelType: ExrPixelType, compression: ExrCompression, channels: ExrChannelName[]) {
  const data = testImage(W, H, channels);
  const file = encodeExr({
    width: W,
    height: H,
    channels,
    data,
    pixelType,
    compression,
    chromaticities: CHROMATICITIES,
    attributes: { comments: "invented gradient", owner: "antisolar tests", "antisolar:space": "linear-rec709" },
  });
  return { data, file };
}

describe("OpenEXR writer: structure read back by an independent reader", () => {
  it.each(COMBINATIONS)("$pixelType / $compression / $channels", ({ pixelType, compression, channels }) => {
    const { data, file } = writeCombination(pixelType, compression, channels);
    const decoded = decodeScanlineExr(file);
    const a = decoded.header.attributes;

    // Required attributes and their types (OpenEXR File Layout, "Header"; Technical Introduction, "Header Attributes").
    const types = Object.fromEntries([...a].map(([name, attr]) => [name, attr.type]));
    expect(types).toEqual({
      channels: "chlist",
      chromaticities: "chromaticities",
      comments: "string",
      compression: "compression",
      dataWindow: "box2i",
      displayWindow: "box2i",
      lineOrder: "lineOrder",
      owner: "string",
      pixelAspectRatio: "float",
      screenWindowCenter: "v2f",
      screenWindowWidth: "float",
      "antisolar:space": "string",
    });
    expect(decoded.channels.map((c) => c.name)).toEqual([...channels].sort());
    for (const c of decoded.channels) expect([c.pixelType, c.xSampling, c.ySampling]).toEqual([pixelType === "half" ? 1 : 2, 1, 1]);
    expect([...a.get("compression")!.value]).toEqual([compression === "zip" ? 3 : 0]);
    expect(int32s(a.get("dataWindow")!)).toEqual([0, 0, W - 1, H - 1]);
    expect(int32s(a.get("displayWindow")!)).toEqual([0, 0, W - 1, H - 1]);
    expect([...a.get("lineOrder")!.value]).toEqual([0]);
    expect(floats(a.get("pixelAspectRatio")!)).toEqual([1]);
    expect(floats(a.get("screenWindowCenter")!)).toEqual([0, 0]);
    expect(floats(a.get("screenWindowWidth")!)).toEqual([1]);
    // Stored as binary32, so equal to the inputs to binary32 precision (relative 2^-24).
    floats(a.get("chromaticities")!).forEach((v, i) => expect(v).toBeCloseTo([0.64, 0.33, 0.3, 0.6, 0.15, 0.06, 0.3127, 0.329][i], 6));
    expect(a.get("antisolar:space")!.value.toString("utf8")).toBe("linear-rec709");

    expectPlanesMatch(decoded.planes, data, channels, pixelType);
  });

  it("ZIP blocks really are deflated when that helps, and stored raw when it does not", () => {
    const smooth = decodeScanlineExr(writeCombination("half", "zip", ["R", "G", "B"]).file);
    const rawBlockBytes = 16 * W * 3 * 2;
    expect(smooth.packedSizes[0]).toBeLessThan(rawBlockBytes / 2);
    const random = lcg(99);
    const noise = new Float32Array(20 * 16 * 3).map(() => (random() - 0.5) * 1e6);
    const file = encodeExr({ width: 20, height: 16, channels: ["R", "G", "B"], data: noise, pixelType: "float", compression: "zip" });
    const decoded = decodeScanlineExr(file);
    expect(decoded.packedSizes).toEqual([20 * 16 * 3 * 4]);
    expectPlanesMatch(decoded.planes, noise, ["R", "G", "B"], "float");
  });

  it("rejects inconsistent input", () => {
    const base = { width: 2, height: 2, channels: ["R", "G", "B"] as ExrChannelName[], data: new Float32Array(12), pixelType: "half" as const, compression: "none" as const };
    expect(() => encodeExr(base)).not.toThrow();
    expect(() => encodeExr({ ...base, data: new Float32Array(11) })).toThrow(RangeError);
    expect(() => encodeExr({ ...base, channels: ["R", "R", "B"] })).toThrow(RangeError);
    expect(() => encodeExr({ ...base, width: 0, data: new Float32Array(0) })).toThrow(RangeError);
    expect(() => encodeExr({ ...base, attributes: { dataWindow: "x" } })).toThrow(RangeError);
    expect(() => encodeExr({ ...base, attributes: { ["n".repeat(32)]: "x" } })).toThrow(RangeError);
  });
});

// ---- The OpenEXR library's own tools (Debian package "openexr") ----

const EXR_TOOLS = ["exrheader", "exrinfo", "exrmaketiled"];
const haveExrTools = EXR_TOOLS.every((name) => programRuns(name, ["-h"]));
const withoutExrTools = skipWithout(haveExrTools);

/** Skipped where the tools are missing (apt-get install openexr); CI installs them, so there a missing one fails. */
function expectExrTools(): void {
  expect(haveExrTools, `the Debian package openexr must be installed (${EXR_TOOLS.join(", ")})`).toBe(true);
}

function run(tool: string, args: string[]): string {
  const result = spawnSync(tool, args, { encoding: "utf8" });
  expect(result.status, `${tool} ${args.join(" ")}: ${result.stderr}`).toBe(0);
  return result.stdout;
}

/** exrmaketiled output with one uncompressed tile covering the image (OpenEXR File Layout, "Tiles"). */
function decodeSingleTileExr(file: Buffer, width: number, height: number): Map<string, Uint32Array> {
  const header = parseHeader(file);
  expect(header.versionField).toBe(2 | 0x200); // version 2, single-part tiled
  expect(header.attributes.get("tiles")!.type).toBe("tiledesc");
  expect([...header.attributes.get("compression")!.value]).toEqual([0]);
  const channels = channelsOf(header.attributes.get("channels")!);
  const offset = Number(file.readBigUInt64LE(header.headerEnd));
  expect(int32s({ type: "", value: file.subarray(offset, offset + 16) })).toEqual([0, 0, 0, 0]); // tile (0,0), level (0,0)
  const size = file.readInt32LE(offset + 16);
  const planes = new Map(channels.map((c) => [c.name, new Uint32Array(width * height)]));
  scatterLines(file.subarray(offset + 20, offset + 20 + size), channels, width, 0, height, planes);
  return planes;
}

describe("OpenEXR writer: files read by the OpenEXR library's tools", () => {
  it.skipIf(withoutExrTools).each(COMBINATIONS)("exrheader, exrinfo -s and exrmaketiled accept $pixelType / $compression / $channels", ({ pixelType, compression, channels }) => {
    expectExrTools();
    const dir = mkdtempSync(join(tmpdir(), "antisolar-exr-"));
    try {
      const { data, file } = writeCombination(pixelType, compression, channels);
      const scanline = join(dir, "scanline.exr");
      const tiled = join(dir, "tiled.exr");
      writeFileSync(scanline, file);

      const header = run("exrheader", [scanline]);
      const bits = pixelType === "half" ? "16" : "32";
      const listed = [...header.matchAll(/^\s+([RGBA]), (\d+)-bit floating-point, sampling 1 1$/gm)].map((m) => `${m[1]}${m[2]}`);
      expect(listed).toEqual([...channels].sort().map((c) => `${c}${bits}`));
      expect(header).toMatch(compression === "zip" ? /^compression \(type compression\): zip, multi-scanline blocks$/m : /^compression \(type compression\): none$/m);
      expect(header).toContain(`dataWindow (type box2i): (0 0) - (${W - 1} ${H - 1})`);
      expect(header).toContain(`displayWindow (type box2i): (0 0) - (${W - 1} ${H - 1})`);
      expect(header).toMatch(/^lineOrder \(type lineOrder\): increasing y$/m);
      const xy = (label: string) => header.match(new RegExp(`^\\s+${label}\\s+\\(([-\\d.e]+) ([-\\d.e]+)\\)$`, "m"))!.slice(1).map(Number);
      expect([...xy("red"), ...xy("green"), ...xy("blue"), ...xy("white")]).toEqual([0.64, 0.33, 0.3, 0.6, 0.15, 0.06, 0.3127, 0.329]);
      expect(header).toContain('antisolar:space (type string): "linear-rec709"');

      // -s: strict header validation by OpenEXRCore.
      expect(run("exrinfo", ["-s", scanline])).toContain(`compression: '${compression}'`);

      // exrmaketiled decodes every pixel through the library; its uncompressed single tile must hold exactly our samples.
      run("exrmaketiled", ["-o", "-z", "none", "-t", String(W), String(H), scanline, tiled]);
      const planes = decodeSingleTileExr(readFileSync(tiled), W, H);
      expectPlanesMatch(planes, data, channels, pixelType);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it.skipIf(withoutExrTools)("exrinfo rejects a file whose header is cut short (the check can fail)", () => {
    expectExrTools();
    const dir = mkdtempSync(join(tmpdir(), "antisolar-exr-"));
    try {
      const path = join(dir, "cut.exr");
      writeFileSync(path, writeCombination("half", "zip", ["R", "G", "B"]).file.subarray(0, 60));
      expect(spawnSync("exrinfo", ["-s", path]).status).not.toBe(0);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
