import { describe, it, expect } from "vitest";
import Color from "colorjs.io";
import {
  OUTPUT_SPACE_IDS, type Matrix3, colorjsD65White, decodeToLinear, deltaE2000, encodeLinear, multiplyMatrix3,
  outputSpace, renderXyz, spectrumToXyz, colourMatchingFunctions,
} from "../../../lib/colour/index.js";
import { makeWavelengthGrid } from "../../../lib/spectra/index.js";
import { d65Spectrum } from "../../../lib/sun/index.js";

function invert(m: Matrix3): Matrix3 {
  const [a, b, c, d, e, f, g, h, i] = m;
  const det = a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g);
  return [(e * i - f * h) / det, (c * h - b * i) / det, (b * f - c * e) / det, (f * g - d * i) / det, (a * i - c * g) / det,
    (c * d - a * f) / det, (d * h - e * g) / det, (b * g - a * h) / det, (a * e - b * d) / det];
}
const maxAbsDiff = (a: readonly number[], b: readonly number[]) => Math.max(...a.map((v, i) => Math.abs(v - b[i])));

describe("sRGB (IEC 61966-2-1:1999)", () => {
  const m = outputSpace("srgb-linear").linearFromXyzD65;
  it("XYZ→linear sRGB equals the matrix computed from the primaries and white (0.3127, 0.3290) to 1e-9", () => {
    const fromPrimaries = [3.2409699419, -1.5373831776, -0.4986107603, -0.9692436363, 1.8759675015, 0.0415550574, 0.0556300797, -0.2039769589, 1.0569715142];
    expect(maxAbsDiff(m, fromPrimaries)).toBeLessThan(1e-9);
  });
  it("agrees with the standard's 4-decimal matrices within rounding (inverse: 5e-5; forward: 4e-4, as the standard rounded its inverse)", () => {
    const rgbToXyz4 = [0.4124, 0.3576, 0.1805, 0.2126, 0.7152, 0.0722, 0.0193, 0.1192, 0.9505];
    expect(maxAbsDiff(invert(m), rgbToXyz4)).toBeLessThan(5e-5 + 1e-12);
    const xyzToRgb4 = [3.2406, -1.5372, -0.4986, -0.9689, 1.8758, 0.0415, 0.0557, -0.204, 1.057];
    expect(maxAbsDiff(m, xyzToRgb4)).toBeLessThan(4e-4);
  });
  it("encode and decode values (computed from IEC 61966-2-1's transfer function, docs/checks.md; 1e-8 = their 8th decimal)", () => {
    const space = outputSpace("srgb");
    const enc = (v: number) => encodeLinear(space, [v, v, v])[0];
    const dec = (v: number) => decodeToLinear(space, [v, v, v])[0];
    const pairs: [number, number][] = [[0.0031308, 0.04044994], [0.01, 0.09985282], [0.18, 0.46135613], [0.5, 0.73535698], [1, 1]];
    for (const [l, v] of pairs) expect(Math.abs(enc(l) - v)).toBeLessThan(1e-8);
    expect(Math.abs(dec(0.5) - 0.21404114)).toBeLessThan(1e-8);
    expect(Math.abs(dec(128 / 255) - 0.2158605)).toBeLessThan(1e-8);
    expect(Math.abs(dec(0.04045) - 0.0031308)).toBeLessThan(1e-8);
    for (const v of [0.001, 0.2, 0.7]) expect(Math.abs(dec(enc(v)) - v)).toBeLessThan(1e-14);
  });
});

describe("ACEScg (Academy S-2014-004) with colorjs.io's Bradford adaptation D65 → ACES white", () => {
  it("equals XYZ→AP1 (computed from the AP1 primaries) × Bradford(D65 → ACES) built independently from Lam's matrix", () => {
    const xyzToAp1: Matrix3 = [1.6410233797, -0.3248032942, -0.2364246952, -0.6636628587, 1.6153315917, 0.0167563477, 0.0117218943, -0.008284442, 0.9883948585];
    // Bradford cone matrix (Lam 1985; ICC.1 Annex E, as public colour-management code cites it; 4 decimals).
    const bradford: Matrix3 = [0.8951, 0.2664, -0.1614, -0.7502, 1.7135, 0.0367, 0.0389, -0.0685, 1.0296];
    const d65 = [0.3127 / 0.329, 1, (1 - 0.3127 - 0.329) / 0.329];
    const aces = [0.32168 / 0.33767, 1, (1 - 0.32168 - 0.33767) / 0.33767];
    const cone = (w: number[]) => [0, 1, 2].map((r) => bradford[3 * r] * w[0] + bradford[3 * r + 1] * w[1] + bradford[3 * r + 2] * w[2]);
    const s = cone(d65);
    const d = cone(aces);
    const scale: Matrix3 = [d[0] / s[0], 0, 0, 0, d[1] / s[1], 0, 0, 0, d[2] / s[2]];
    const acesFromD65 = multiplyMatrix3(invert(bradford), multiplyMatrix3(scale, bradford));
    const expected = multiplyMatrix3(xyzToAp1, acesFromD65);
    // 1e-9: both sides use the same published inputs; only round-off differs.
    expect(maxAbsDiff(outputSpace("acescg").linearFromXyzD65, expected)).toBeLessThan(1e-9);
  });
  it("maps colorjs.io's D65 white to (1, 1, 1)", () => {
    const m = outputSpace("acescg").linearFromXyzD65;
    const w = colorjsD65White();
    for (let r = 0; r < 3; r++) expect(m[3 * r] * w[0] + m[3 * r + 1] * w[1] + m[3 * r + 2] * w[2]).toBeCloseTo(1, 12);
  });
});

describe("renderXyz agrees with colorjs.io and handles white and gamut", () => {
  const samples = Float64Array.from([0.2, 0.3, 0.1, 0.5, 0.5, 0.5, 0.05, 0.04, 0.2, 0.9, 0.95, 1.0]);
  it("in-gamut colours equal colorjs.io's own conversion in every space (1e-12)", () => {
    const ids = { "xyz-d65": "xyz-d65", "srgb-linear": "srgb-linear", srgb: "srgb", "display-p3": "p3", rec2020: "rec2020", acescg: "acescg" } as const;
    for (const id of OUTPUT_SPACE_IDS) {
      const out = renderXyz(samples, { space: id, gamut: "clip", white: "absolute" });
      for (let s = 0; s < samples.length / 3; s++) {
        const ref = new Color("xyz-d65", [samples[3 * s], samples[3 * s + 1], samples[3 * s + 2]]).to(ids[id]).coords.map(Number);
        expect(out.outOfGamut[s], `${id} sample ${s}`).toBe(0);
        expect(maxAbsDiff(Array.from(out.values.subarray(3 * s, 3 * s + 3)), ref)).toBeLessThan(1e-12);
      }
    }
  });
  it("a flat (equal-energy) sun with white 'sun' renders as R = G = B in every RGB space", () => {
    const grid = makeWavelengthGrid(360, 830, 1);
    const flat = spectrumToXyz({ grid, values: new Float64Array(grid.count).fill(1) }, "cie1931-2");
    const xyz = Float64Array.of(flat.X / flat.Y, 1, flat.Z / flat.Y);
    for (const id of ["srgb-linear", "srgb", "display-p3", "rec2020", "acescg"] as const) {
      const out = renderXyz(xyz, { space: id, gamut: "clip", white: "sun", sunWhite: flat });
      for (let c = 0; c < 3; c++) expect(out.values[c], id).toBeCloseTo(1, 12);
    }
    const xyzOut = renderXyz(xyz, { space: "xyz-d65", gamut: "clip", white: "sun", sunWhite: flat }).values;
    expect(maxAbsDiff(Array.from(xyzOut), colorjsD65White())).toBeLessThan(1e-12);
  });
  it("D65 light with white 'absolute' is nearly neutral in sRGB (CIE D65 vs the rounded sRGB white: < 1e-3)", () => {
    const d65 = spectrumToXyz(d65Spectrum(makeWavelengthGrid(360, 830, 1)), "cie1931-2");
    const out = renderXyz(Float64Array.of(d65.X / d65.Y, 1, d65.Z / d65.Y), { space: "srgb-linear", gamut: "clip", white: "absolute" });
    for (let c = 0; c < 3; c++) expect(Math.abs(out.values[c] - 1)).toBeLessThan(1e-3);
  });
  // A spectral green at 520 nm, luminance 0.3: far outside sRGB.
  const cmf = colourMatchingFunctions("cie1931-2", makeWavelengthGrid(520, 520, 1));
  const k = 0.3 / cmf.yBar.values[0];
  const green = Float64Array.of(k * cmf.xBar.values[0], 0.3, k * cmf.zBar.values[0]);
  it("flags out-of-gamut samples; clip lands in [0, 1]", () => {
    const out = renderXyz(green, { space: "srgb", gamut: "clip", white: "absolute" });
    expect(out.outOfGamut[0]).toBe(1);
    for (const v of out.linear) expect(v >= 0 && v <= 1).toBe(true);
  });
  it("desaturate keeps luminance Y and lands on the gamut boundary", () => {
    const out = renderXyz(green, { space: "srgb-linear", gamut: "desaturate", white: "absolute" });
    const [r, g, b] = out.linear;
    const y = new Color("srgb-linear", [r, g, b]).to("xyz-d65").coords[1];
    expect(Math.abs(Number(y) - 0.3)).toBeLessThan(1e-12);
    expect(Math.min(r, g, b)).toBeCloseTo(0, 12);
    expect(Math.max(r, g, b)).toBeLessThanOrEqual(1);
  });
  it("css4 equals colorjs.io toGamut({ method: 'css' }) and is in gamut", () => {
    const out = renderXyz(green, { space: "display-p3", gamut: "css4", white: "absolute" });
    const ref = new Color("xyz-d65", Array.from(green) as [number, number, number]).to("p3").toGamut({ method: "css" }).coords.map(Number);
    expect(out.outOfGamut[0]).toBe(1);
    expect(maxAbsDiff(Array.from(out.values), ref)).toBeLessThan(1e-12);
    for (const v of out.values) expect(v >= 0 && v <= 1).toBe(true);
  });
});

describe("CIEDE2000 helper", () => {
  // Sharma, Wu & Dalal 2005 (Color Res. Appl. 30, 21), Table 1 pairs 1 and 7 (as carried in public
  // CIEDE2000 test suites' copies of the table, which list 34 pairs); the table gives 4 decimals.
  it("reproduces Sharma et al. test pairs through XYZ round trips", () => {
    const toXyz = (lab: [number, number, number]) => new Color("lab", lab).to("xyz-d65").coords.map(Number);
    const a = Float64Array.from([...toXyz([50, 2.6772, -79.7751]), ...toXyz([50, 0, 0])]);
    const b = Float64Array.from([...toXyz([50, 0, -82.7485]), ...toXyz([50, -1, 2])]);
    const d = deltaE2000(a, b);
    expect(Math.abs(d[0] - 2.0425)).toBeLessThan(1e-4);
    expect(Math.abs(d[1] - 2.3669)).toBeLessThan(1e-4);
  });
});
