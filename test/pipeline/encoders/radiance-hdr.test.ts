import { describe, it, expect } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { encodeRadianceHdr, rgbeFromRgb } from "../../../pipeline/encoders/radiance-hdr.js";
import { programRuns, skipWithout } from "../../helpers/tools.js";

type Rgbe = [number, number, number, number];

// ---- Independent RGBE and Radiance-picture reader (Ward, "Real Pixels", Graphics Gems II, 1991; Radiance "File Formats") ----

/** Ward 1991: with 2^(e−1) ≤ max(r,g,b) < 2^e, bytes ⌊c·2^(8−e)⌋ and e + 128; black below the exponent range. */
function referenceRgbe(r: number, g: number, b: number): Rgbe {
  const [cr, cg, cb] = [r, g, b].map((c) => Math.max(c, 0));
  const largest = Math.max(cr, cg, cb);
  if (largest < 2 ** -128) return [0, 0, 0, 0];
  let e = 0;
  while (2 ** e <= largest) e++;
  while (2 ** (e - 1) > largest) e--;
  return [cr, cg, cb].map((c) => Math.floor(c * 2 ** (8 - e))).concat(e + 128) as Rgbe;
}

/** Radiance's decoding puts each value mid-way in its interval: (byte + 0.5)·2^(E − 136) (Radiance's color.c, colr_color: f = ldexp(1, E − (COLXS + 8)), COLXS = 128). */
function rgbFromRgbe([r, g, b, e]: Rgbe): [number, number, number] {
  if (e === 0) return [0, 0, 0];
  const f = 2 ** (e - 136);
  return [(r + 0.5) * f, (g + 0.5) * f, (b + 0.5) * f];
}

interface Picture {
  headerLines: string[];
  width: number;
  height: number;
  pixels: Rgbe[];
  newStyleLines: number;
}

function readPicture(file: Buffer): Picture {
  const blank = file.indexOf("\n\n");
  const headerLines = file.toString("latin1", 0, blank).split("\n");
  const resolutionEnd = file.indexOf("\n", blank + 2);
  const resolution = file.toString("latin1", blank + 2, resolutionEnd).match(/^-Y (\d+) \+X (\d+)$/);
  expect(resolution).not.toBeNull();
  const height = Number(resolution![1]);
  const width = Number(resolution![2]);
  const pixels: Rgbe[] = [];
  let newStyleLines = 0;
  let at = resolutionEnd + 1;
  for (let y = 0; y < height; y++) {
    const newStyle = width >= 8 && width <= 0x7fff && file[at] === 2 && file[at + 1] === 2 && (file[at + 2] & 0x80) === 0;
    if (!newStyle) {
      for (let x = 0; x < width; x++, at += 4) {
        const p = [...file.subarray(at, at + 4)] as Rgbe;
        expect(p[0] === 1 && p[1] === 1 && p[2] === 1, "old-style repeat code in flat data").toBe(false);
        pixels.push(p);
      }
      continue;
    }
    newStyleLines++;
    expect((file[at + 2] << 8) | file[at + 3]).toBe(width);
    at += 4;
    const planes = [0, 1, 2, 3].map(() => new Uint8Array(width));
    for (const plane of planes) {
      for (let x = 0; x < width; ) {
        const code = file[at++];
        if (code > 128) {
          plane.fill(file[at++], x, x + code - 128);
          x += code - 128;
        } else {
          expect(code).toBeGreaterThan(0);
          expect(x + code).toBeLessThanOrEqual(width);
          plane.set(file.subarray(at, at + code), x);
          at += code;
          x += code;
        }
      }
    }
    for (let x = 0; x < width; x++) pixels.push(planes.map((p) => p[x]) as Rgbe);
  }
  expect(at).toBe(file.length);
  return { headerLines, width, height, pixels, newStyleLines };
}

/** Deterministic pseudo-random numbers in [0, 1) (32-bit LCG 1664525, 1013904223: Press et al. 1992, Numerical Recipes in C §7.1). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

/** Invented HDR content: flat stretches (long runs), noise (long dumps), and radiances from 2^-20 to 2^20. */
function testPicture(width: number, height: number, seed = 3): Float32Array {
  const random = lcg(seed);
  const data = new Float32Array(width * height * 3);
  for (let p = 0; p < width * height; p++) {
    const x = p % width;
    const flat = x % 400 < 140; // 140 flat then 260 noisy pixels
    const scale = 2 ** Math.round(40 * random() - 20);
    for (let c = 0; c < 3; c++) data[3 * p + c] = flat ? 0.75 * (c + 1) : random() * scale;
  }
  return data;
}

describe("RGBE pixel coding (Ward 1991)", () => {
  it("codes values worked from the definition", () => {
    expect(rgbeFromRgb(1, 1, 1)).toEqual([128, 128, 128, 129]); // 1 = 0.5·2^1
    expect(rgbeFromRgb(0.5, 0.5, 0.5)).toEqual([128, 128, 128, 128]);
    expect(rgbeFromRgb(1, 0.5, 0.25)).toEqual([128, 64, 32, 129]);
    expect(rgbeFromRgb(3, 0, 0)).toEqual([192, 0, 0, 130]); // 3 = 0.75·2^2
    expect(rgbeFromRgb(0, 0, 0)).toEqual([0, 0, 0, 0]);
    expect(rgbeFromRgb(2 ** -129, 0, 0)).toEqual([0, 0, 0, 0]); // below the smallest exponent byte, 1
    expect(rgbeFromRgb(2 ** -128, 0, 0)).toEqual([128, 0, 0, 1]);
    expect(rgbeFromRgb(2 ** 127 * (1 - 2 ** -24), 0, 0)).toEqual([255, 0, 0, 255]);
    expect(rgbeFromRgb(-1, 0.5, 0)).toEqual([0, 128, 0, 128]); // RGBE has no sign: negatives written as 0
  });

  it("refuses what RGBE cannot hold", () => {
    expect(() => rgbeFromRgb(2 ** 127, 0, 0)).toThrow(RangeError);
    expect(() => rgbeFromRgb(NaN, 0, 0)).toThrow(RangeError);
    expect(() => rgbeFromRgb(0, Infinity, 0)).toThrow(RangeError);
  });

  it("agrees with the definition on 20 000 invented pixels across 2^-130 .. 2^126", () => {
    const random = lcg(11);
    const mismatches: string[] = [];
    for (let i = 0; i < 20_000; i++) {
      const scale = 2 ** Math.floor(256 * random() - 130);
      const rgb = [random() * scale, random() * scale, random() * scale] as const;
      const got = rgbeFromRgb(...rgb);
      const want = referenceRgbe(...rgb);
      if (got.join() !== want.join() && mismatches.length < 5) mismatches.push(`${rgb}: ${got} vs ${want}`);
    }
    expect(mismatches).toEqual([]);
  });
});

describe("Radiance picture writer", () => {
  it("writes the header, blank line and resolution string", () => {
    const file = encodeRadianceHdr({
      width: 300,
      height: 3,
      data: testPicture(300, 3),
      exposure: 0.5,
      primaries: [[0.64, 0.33], [0.3, 0.6], [0.15, 0.06], [0.3127, 0.329]],
    });
    const picture = readPicture(file);
    expect(picture.headerLines).toEqual(["#?RADIANCE", "FORMAT=32-bit_rle_rgbe", "EXPOSURE=0.5", "PRIMARIES=0.64 0.33 0.3 0.6 0.15 0.06 0.3127 0.329"]);
    expect([picture.width, picture.height]).toEqual([300, 3]);
  });

  // 5 and 7: too narrow for run-length lines; 8 and 32767: the limits; 300: runs > 127 and dumps > 128; 32768: too wide.
  it.each([
    [5, 4],
    [7, 2],
    [8, 3],
    [300, 5],
    [32767, 1],
    [32768, 1],
  ])("round-trips %i × %i pixels within the RGBE precision", (width, height) => {
    const data = testPicture(width, height);
    const file = encodeRadianceHdr({ width, height, data });
    const picture = readPicture(file);
    expect(picture.newStyleLines).toBe(width >= 8 && width <= 32767 ? height : 0);
    expect(picture.pixels.length).toBe(width * height);

    let worstBytes = "";
    let worstRelative = 0;
    picture.pixels.forEach((rgbe, p) => {
      const rgb = [data[3 * p], data[3 * p + 1], data[3 * p + 2]] as const;
      if (!worstBytes && rgbe.join() !== referenceRgbe(...rgb).join()) worstBytes = `pixel ${p}: ${rgbe} vs ${referenceRgbe(...rgb)}`;
      const back = rgbFromRgbe(rgbe);
      const largest = Math.max(...rgb);
      for (let c = 0; c < 3; c++) worstRelative = Math.max(worstRelative, Math.abs(back[c] - rgb[c]) / largest);
    });
    expect(worstBytes).toBe("");
    // The largest component keeps 8 significant bits and the decoder adds half a unit: error ≤ 2^-8 of that component.
    expect(worstRelative).toBeLessThanOrEqual(2 ** -8);
  });

  it("run-length coding shrinks flat content", () => {
    const width = 1000;
    const flat = encodeRadianceHdr({ width, height: 4, data: new Float32Array(width * 4 * 3).fill(0.3) });
    expect(flat.length).toBeLessThan((width * 4 * 4) / 20);
    expect(readPicture(flat).pixels.every((p) => p.join() === referenceRgbe(0.3, 0.3, 0.3).join())).toBe(true);
  });

  it("rejects inconsistent input", () => {
    expect(() => encodeRadianceHdr({ width: 2, height: 2, data: new Float32Array(11) })).toThrow(RangeError);
    expect(() => encodeRadianceHdr({ width: 0, height: 2, data: new Float32Array(0) })).toThrow(RangeError);
    expect(() => encodeRadianceHdr({ width: 1, height: 1, data: new Float32Array(3), exposure: 0 })).toThrow(RangeError);
  });
});

// ---- ImageMagick's RGBE reader (Debian package "imagemagick") ----

const MAGICK_CANDIDATES = ["magick", "convert-im6.q16"];
const magick = MAGICK_CANDIDATES.find((name) => programRuns(name, ["-version"]));

describe("Radiance picture writer: files read by ImageMagick", () => {
  // Skipped where ImageMagick is missing (apt-get install imagemagick); CI installs it, so there a missing one fails.
  it.skipIf(skipWithout(magick !== undefined)).each([5, 40])("ImageMagick decodes a %i-pixel-wide picture to our values", (width) => {
    expect(magick, "the Debian package imagemagick must be installed").toBeDefined();
    const height = 6;
    // Values in [2^-10, 1): the Debian build is Q16 without HDRI, so it clips above 1.
    const random = lcg(width);
    const data = new Float32Array(width * height * 3).map((_, i) => (i % 23 < 9 ? 0.375 : 2 ** (-10 * random()) * 0.999));
    const dir = mkdtempSync(join(tmpdir(), "antisolar-hdr-"));
    try {
      const input = join(dir, "in.hdr");
      const output = join(dir, "out.raw");
      writeFileSync(input, encodeRadianceHdr({ width, height, data }));
      // "-set colorspace sRGB" relabels without converting, so the raw floats are the linear values read.
      const result = spawnSync(magick!, [input, "-set", "colorspace", "sRGB", "-depth", "32", "-define", "quantum:format=floating-point", `RGB:${output}`], { encoding: "utf8" });
      expect(result.status, result.stderr).toBe(0);
      const raw = readFileSync(output);
      const read = new Float32Array(raw.buffer, raw.byteOffset, raw.length / 4);
      expect(read.length).toBe(data.length);
      // A reader that truncates instead of centring loses up to one unit of the shared exponent, 2^-7 of the largest
      // component; Q16 storage adds up to 0.5/65535 < 2^-16 absolute. Worst ratio of error to that allowance:
      let worst = 0;
      for (let i = 0; i < data.length; i++) {
        const p = i - (i % 3);
        const allowance = 2 ** -7 * Math.max(data[p], data[p + 1], data[p + 2]) + 2 ** -16;
        worst = Math.max(worst, Math.abs(read[i] - data[i]) / allowance);
      }
      expect(worst).toBeLessThanOrEqual(1);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
