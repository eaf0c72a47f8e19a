import { describe, expect, it } from "vitest";
import { findBows, findBowsByDispersion } from "../../../lib/bow/bow-peaks.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { waterIndex } from "../../../lib/water/water-index.js";
import { profileOf } from "../../helpers/profile.js";
import { bowAngle2d } from "../../helpers/outline-trace-2d.js";
import { wavelengthsNm } from "../../../lib/spectra/grid.js";
import type { ProfileResult } from "../../../pipeline/compute/profile.js";

// Wavelengths 440–640 nm by 20 nm: the labels compare the shortest and the longest third of them.
const cheap = {
  spectral: { fromNm: 440, toNm: 640, stepNm: 20 },
  angles: { fromDeg: 20, toDeg: 60, stepDeg: 0.1 },
  sun: { elevationDeg: 10 },
};

describe("which luminance maximum is which bow, for flattened drops", () => {
  it("1 mm drops at the top of the bow: the primary near 29° and the secondary near 45°, where an independent 2D trace through the drop's vertical outline puts their folds", async () => {
    // Without canting the scattering plane at the top holds the drop's axis, so ray optics in it is 2D
    // (test/helpers/outline-trace-2d.ts). With the fixed windows (primary 30–46°) the secondary, bright at 45°, was
    // reported as the primary.
    const result = await profileOf({
      ...cheap,
      drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } },
      arcPositionDeg: 0,
    });
    const outline = equilibriumOutline(1000);
    // ψ = 180° − Θ of the folds at the outer wavelengths, water at the request's 20 °C (IAPWS R9-97).
    const foldPsi = (p: number, wavelengthNm: number) => {
      const n = waterIndex({ wavelengthNm, temperatureC: 20, salinityPsu: 0 }).nRelativeToAir;
      return 180 - bowAngle2d(outline, n, 10, p, 1, p === 2 ? 138 : 129);
    };
    const primary = [foldPsi(2, 440), foldPsi(2, 640)];
    const secondary = [foldPsi(3, 640), foldPsi(3, 440)];
    // Measured: folds 28.73–29.95° and 44.32–45.79°; labels 29.4° and 45.0°. The lit side of the primary's fold is
    // inside it and of the secondary's outside, where wave theory puts the maxima (a few tenths of a degree at x ≈ 10⁴).
    expect(primary[1] - primary[0]).toBeGreaterThan(1);
    expect(result.bows.primaryDeg).toBeGreaterThanOrEqual(primary[0] - 0.5);
    expect(result.bows.primaryDeg).toBeLessThanOrEqual(primary[1]);
    expect(result.bows.secondaryDeg).toBeGreaterThanOrEqual(secondary[0]);
    expect(result.bows.secondaryDeg).toBeLessThanOrEqual(secondary[1] + 0.5);
  }, 600_000);

  it.each([
    ["0.5 mm spheres, Airy", { kind: "monodisperse", radiusUm: 500 }, "airy"],
    ["a Marshall–Palmer shower, auto", undefined, "auto"],
  ])("%s: telling the bows by their colour order finds what the fixed windows find", async (_, drops, method) => {
    const result: ProfileResult = await profileOf({ ...cheap, ...(drops ? { drops } : {}), method });
    const radiance = result.spectral.perpendicular.map((v, k) => v + result.spectral.parallel[k]);
    const byDispersion = findBowsByDispersion({ anglesDeg: result.spectral.anglesDeg, wavelengthsNm: wavelengthsNm(result.grid), radiance }, result.colour.luminance);
    const byWindow = findBows(result.spectral.anglesDeg, result.colour.luminance);
    expect(byWindow.primaryDeg).not.toBeNull();
    expect(byWindow.secondaryDeg).not.toBeNull();
    expect(byDispersion).toEqual(byWindow);
  }, 600_000);
});
