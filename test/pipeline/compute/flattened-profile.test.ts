import { beforeAll, describe, expect, it } from "vitest";
import { profileOf } from "../../helpers/profile.js";
import type { ProfileResult } from "../../../pipeline/compute/profile.js";

// Two wavelengths around 550 nm and a narrow window keep these end-to-end profiles cheap: the flattened-drop
// engine traces every drop size, wavelength and canting node (lib/bow/shaped-rows.ts).
const cheap = {
  spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
  angles: { fromDeg: 34, toDeg: 46, stepDeg: 0.05 },
  sun: { elevationDeg: 10 },
  output: { normalise: "physical" },
};

function drops(radiusUm: number, shape: object) {
  return { kind: "monodisperse", radiusUm, numberPerM3: 1000, shape };
}

/** The largest luminance in [lo, hi], where it is, and the width (degrees) over which it stays above half of that. */
function peakAndWidth(result: ProfileResult, lo: number, hi: number): { peak: number; at: number; width: number } {
  const a = result.spectral.anglesDeg;
  const y = result.colour.luminanceCdPerM2;
  let best = -1;
  for (let i = 0; i < a.length; i++) if (a[i] >= lo && a[i] <= hi && (best < 0 || y[i] > y[best])) best = i;
  let count = 0;
  for (let i = 0; i < a.length; i++) if (a[i] >= lo && a[i] <= hi && y[i] >= y[best] / 2) count++;
  return { peak: y[best], at: a[best], width: count * (a[1] - a[0]) };
}

/** Share of the luminance summed over [fromDeg, toDeg] that lies in [lo, hi]. */
function share(result: ProfileResult, lo: number, hi: number, fromDeg: number, toDeg: number): number {
  const a = result.spectral.anglesDeg;
  const y = result.colour.luminanceCdPerM2;
  let part = 0;
  let all = 0;
  for (let i = 0; i < a.length; i++) {
    if (a[i] < fromDeg || a[i] > toDeg) continue;
    all += y[i];
    if (a[i] >= lo && a[i] <= hi) part += y[i];
  }
  return part / all;
}

/** Local maxima of the luminance inside [lo, hi] that stand out by `contrast` over the minimum before them. */
function fringes(result: ProfileResult, lo: number, hi: number, contrast: number): number {
  const a = result.spectral.anglesDeg;
  const y = result.colour.luminanceCdPerM2;
  let count = 0;
  let lowest = Infinity;
  for (let i = 1; i + 1 < a.length; i++) {
    if (a[i] < lo || a[i] > hi) continue;
    lowest = Math.min(lowest, y[i]);
    if (y[i] > y[i - 1] && y[i] >= y[i + 1] && y[i] > contrast * lowest) {
      count++;
      lowest = y[i];
    }
  }
  return count;
}

describe("flattened drops end to end: Fraser's (1983, J. Opt. Soc. Am. 73, 1626) facts of the trade", () => {
  const rain = drops(1000, { kind: "equilibrium" });
  const drizzle = drops(200, { kind: "equilibrium" });
  const results: Record<string, ProfileResult> = {};
  beforeAll(async () => {
    results.rainTop = await profileOf({ ...cheap, drops: rain, arcPositionDeg: 0 });
    results.rainSide = await profileOf({ ...cheap, drops: rain, arcPositionDeg: 90 });
    results.rainSphere = await profileOf({ ...cheap, drops: drops(1000, { kind: "sphere" }) });
    results.drizzleTop = await profileOf({ ...cheap, drops: drizzle, arcPositionDeg: 0 });
  }, 600_000);

  it("rain of 2 mm drops: the top of the primary is weakened and smeared, its side keeps the sphere's bow; no supernumeraries at the top", () => {
    const top = peakAndWidth(results.rainTop, 38, 46);
    const side = peakAndWidth(results.rainSide, 38, 46);
    const sphere = peakAndWidth(results.rainSphere, 38, 46);
    // Weakened: below half the side's peak (measured 0.25 of it). Smeared: the share of the window's light within
    // ±0.5° of the sphere's bow is smaller at the top (measured: the top's brightest light lies 3.5° outside it).
    expect(top.peak).toBeLessThan(0.5 * side.peak);
    const near = (r: ProfileResult) => share(r, sphere.at - 0.5, sphere.at + 0.5, 36, 46);
    expect(near(results.rainTop)).toBeLessThan(0.5 * near(results.rainSide));
    // The side: within 0.2° of the sphere's peak (measured 0.15°, sun 10° up: the plane is tilted from the horizontal
    // section) and within a factor of two in height (measured 0.83: canting spreads it).
    expect(Math.abs(side.at - sphere.at)).toBeLessThanOrEqual(0.2);
    expect(side.peak / sphere.peak).toBeGreaterThan(0.5);
    expect(side.peak / sphere.peak).toBeLessThan(2);
    // Fraser: no supernumerary bands near the top in rain of large drops (measured: none inside 38–41.5°).
    expect(fringes(results.rainTop, 38, sphere.at - 0.2, 1.1)).toBe(0);
  });

  it("drizzle of 0.4 mm drops keeps supernumerary bands at the top of the primary", () => {
    // Inside the primary (ψ < its peak) at least one further maximum stands 10 % over the dip before it.
    const peak = peakAndWidth(results.drizzleTop, 38, 44).at;
    expect(fringes(results.drizzleTop, 34, peak + 0.5, 1.1)).toBeGreaterThanOrEqual(2);
  });

  it("meta names the shape model, the axis ratios used and the place on the bow; spheres get a note for an arc position", async () => {
    const shape = results.rainTop.meta.shape;
    expect(shape.model).toMatch(/Beard & Chuang 1987/);
    expect(shape.arcPositionDeg).toBe(0);
    const radii = shape.flattenedRadii!;
    expect(radii.axisRatioFrom).toBeGreaterThan(0.92);
    expect(radii.axisRatioFrom).toBeLessThan(0.935);
    const sphere = (await profileOf({ ...cheap, drops: drops(1000, { kind: "sphere" }), arcPositionDeg: 30 })).meta.shape;
    expect(sphere.model).toBe("sphere");
    expect(sphere.note).toMatch(/changes nothing/);
    expect(sphere.default).toMatch(/spheres unless/);
  });
});
