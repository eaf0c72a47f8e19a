import { describe, expect, it } from "vitest";
import { MES2_A, MES2_B, mesopicAdaptation, mesopicLuminance, scotopicEfficiency, scotopicOf } from "../../../lib/colour/mesopic.js";
import { applyEyeToXyz, eyeAdaptation } from "../../../lib/colour/low-light-vision.js";
import { makeWavelengthGrid } from "../../../lib/spectra/grid.js";
import { spectrumToXyz } from "../../../lib/colour/tristimulus.js";
import { d65Spectrum } from "../../../lib/sun/daylight.js";
import { blackbodySpectrum } from "../../../lib/sun/blackbody.js";

const grid = makeWavelengthGrid(380, 780, 1);
const sOverP = (values: Float64Array) => scotopicOf(grid, values)[0] / (683 * spectrumToXyz({ grid, values }, "cie1931-2").Y);

describe("scotopic photometry (CIE 1951 V′)", () => {
  it("V′ peaks near 507 nm and is 0.402 at 555 nm (CIE 191:2010's V′(λ0))", () => {
    const v = scotopicEfficiency(makeWavelengthGrid(505, 510, 1));
    expect(Math.max(...v)).toBeGreaterThan(0.997);
    expect(scotopicEfficiency(makeWavelengthGrid(555, 556, 1))[0]).toBeCloseTo(0.402, 6);
  });
  it("S/P ratios of illuminant A (2856 K) and D65 are 1.41 and 2.47 (lighting handbooks' S/P tables; from memory), within 2 %", () => {
    expect(Math.abs(sOverP(blackbodySpectrum(grid, 2856).values) / 1.41 - 1)).toBeLessThan(0.02);
    expect(Math.abs(sOverP(d65Spectrum(grid).values) / 2.47 - 1)).toBeLessThan(0.02);
  });
});

describe("mesopic photometry (CIE 191:2010, MES2)", () => {
  it("a light with S/P = 1 has Lmes = Lp at every level (the definition's normalisation at V′(λ0)/V(λ0))", () => {
    // S/P = 1 means Ls = Lp, so Lmes = (m Lp + (1 − m) Lp V′0)/(m + (1 − m) V′0) = Lp.
    for (const lp of [0.003, 0.02, 0.3, 3]) expect(mesopicAdaptation(lp, lp).mesopicCdPerM2).toBeCloseTo(lp, 12);
  });
  it("is photopic at 5 cd/m² and above, scotopic at 0.005 cd/m² and below (CIE 191:2010 §5)", () => {
    expect(mesopicAdaptation(10, 20).m).toBe(1);
    expect(mesopicAdaptation(10, 20).mesopicCdPerM2).toBe(10);
    expect(mesopicAdaptation(0.001, 0.002).m).toBe(0);
    expect(mesopicAdaptation(0.001, 0.002).mesopicCdPerM2).toBeCloseTo(0.002 * 1, 12);
  });
  it("the iteration converges to m = a + b·log10(Lmes) with a = 0.7670, b = 0.3334 (CIE 191:2010)", () => {
    for (const [lp, sp] of [[0.1, 2], [1, 1.5], [0.02, 2.4], [2, 0.6]]) {
      const r = mesopicAdaptation(lp, lp * sp);
      expect(r.m).toBeCloseTo(MES2_A + MES2_B * Math.log10(r.mesopicCdPerM2), 8);
      expect(r.mesopicCdPerM2).toBeCloseTo(mesopicLuminance(lp, lp * sp, r.m), 12);
      // A bluish light looks brighter to a mesopic eye than its photopic luminance says, a reddish one darker.
      if (sp > 1) expect(r.mesopicCdPerM2).toBeGreaterThan(lp);
      else expect(r.mesopicCdPerM2).toBeLessThan(lp);
    }
  });
});

describe("the eye's colour", () => {
  it("photopic: the eye's XYZ equal the camera's exactly", () => {
    const xyz = Float64Array.of(10, 12, 8, 30, 20, 5);
    const copy = Float64Array.from(xyz);
    applyEyeToXyz(xyz, Float64Array.of(20, 30), eyeAdaptation(100, 200));
    expect(Array.from(xyz)).toEqual(Array.from(copy));
  });
  it("Y becomes the mesopic luminance; scotopic light has one chromaticity whatever its colour", () => {
    const eye = eyeAdaptation(0.05, 0.1);
    const xyz = Float64Array.of(0.05, 0.05, 0.02, 0.01, 0.02, 0.06);
    const ls = Float64Array.of(0.04, 0.09);
    const lp = [0.05, 0.02];
    applyEyeToXyz(xyz, ls, eye);
    expect(xyz[1]).toBeCloseTo(mesopicLuminance(lp[0], ls[0], eye.m), 12);
    expect(xyz[4]).toBeCloseTo(mesopicLuminance(lp[1], ls[1], eye.m), 12);
    const dark = Float64Array.of(0.5, 0.5, 0.2, 0.1, 0.2, 0.6);
    applyEyeToXyz(dark, ls, eyeAdaptation(0.001, 0.002));
    const x = (k: number) => dark[3 * k] / (dark[3 * k] + dark[3 * k + 1] + dark[3 * k + 2]);
    expect(x(0)).toBeCloseTo(0.25, 12);
    expect(x(1)).toBeCloseTo(0.25, 12);
  });
});
