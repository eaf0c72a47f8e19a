// The main job: drops × sun × observer → the bow's colours along ψ. Physical checks against the trade's
// published rules (sources beside each check).
import { describe, it, expect } from "vitest";
import { profileOf, meanOver, spectralPeakDeg } from "../../helpers/profile.js";

const rain = await profileOf({});
const fog = await profileOf({
  drops: { kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.4, totalNumberPerM3: 1e8 },
  angles: { fromDeg: 20, toDeg: 60, stepDeg: 0.2 },
  spectral: { fromNm: 380, toNm: 780, stepNm: 20 },
});

describe("a rain bow: Marshall–Palmer 2 mm/h, sun 10° high (the default request)", () => {
  const a = rain.spectral.anglesDeg;
  const lum = rain.colour.luminance;

  it("puts the primary at 40.5–42.5° and the secondary at 49.5–53.5°", () => {
    // Descartes' minimum deviation for water, 400–700 nm: primary 40.6–42.4°, secondary 50.2–53.6° (computed
    // from Descartes 1637 with IAPWS R9-97: docs/checks.md), widened by a few tenths for the Airy shift.
    expect(rain.bows.primaryDeg).not.toBeNull();
    expect(rain.bows.secondaryDeg).not.toBeNull();
    expect(rain.bows.primaryDeg!).toBeGreaterThanOrEqual(40.5);
    expect(rain.bows.primaryDeg!).toBeLessThanOrEqual(42.5);
    expect(rain.bows.secondaryDeg!).toBeGreaterThanOrEqual(49.5);
    expect(rain.bows.secondaryDeg!).toBeLessThanOrEqual(53.5);
  });

  it("makes the secondary fainter than the primary", () => {
    // One more internal reflection loses light (Fresnel; van de Hulst 1957 §13.2, common practice: "fainter").
    const primary = lum[a.indexOf(rain.bows.primaryDeg!)];
    const secondary = lum[a.indexOf(rain.bows.secondaryDeg!)];
    expect(secondary).toBeLessThan(0.6 * primary);
  });

  it("orders the colours red-outside in the primary and reversed in the secondary", () => {
    // Dispersion: n(450 nm) > n(650 nm) puts blue inside red in the primary and outside it in the secondary
    // (Descartes angles, docs/checks.md, move from 41.1° to 42.3° and from 52.6° to 50.5°).
    expect(spectralPeakDeg(rain, 650, 38, 45)).toBeGreaterThan(spectralPeakDeg(rain, 450, 38, 45));
    expect(spectralPeakDeg(rain, 650, 47, 56)).toBeLessThan(spectralPeakDeg(rain, 450, 47, 56));
  });

  it("leaves Alexander's dark band darker than the light just inside the primary", () => {
    // No light of orders p = 2 and 3 falls between the bows: each order's deviation has its minimum at its bow
    // (Descartes 1637), so p = 2 stays inside the primary and p = 3 outside the secondary.
    const band = meanOver(a, lum, 44, 48.5);
    const inside = meanOver(a, lum, 36, 39.5);
    expect(band).toBeLessThan(0.5 * inside);
  });

  it("is strongly polarised along the bow at the primary", () => {
    // The rainbow ray meets the inner surface near Brewster's angle: degree of polarisation about 0.9–0.96
    // (Können 1985, Polarized Light in Nature, from memory; Können & de Boer 1979, Appl. Opt. 18, 1961: below the
    // ray-optics value and rising with drop size); we require > 0.8.
    expect(rain.colour.polarisation[a.indexOf(rain.bows.primaryDeg!)]).toBeGreaterThan(0.8);
  });

  it("a polariser across the bow's tangent dims the primary, one along it does not", async () => {
    const along = await profileOf({ polariserDeg: 0, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } });
    const across = await profileOf({ polariserDeg: 90, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } });
    const i = along.spectral.anglesDeg.indexOf(41.5);
    // Malus's law on a ≥ 80 % tangentially polarised bow: the crossed polariser passes ≤ 10 % of the parallel one.
    expect(across.colour.luminanceCdPerM2[i]).toBeLessThan(0.1 * along.colour.luminanceCdPerM2[i]);
  });

  it("reports physical luminance in cd/m² when asked", async () => {
    const physical = await profileOf({ output: { normalise: "physical" }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } });
    const peak = Math.max(...physical.colour.luminance);
    // A 1 km curtain of 2 mm/h rain in direct sunlight: bows of order 10²–10³ cd/m² against a sky of ~10³–10⁴
    // (common practice). A broad window catches a unit error (×683, ×1e6) without fitting the value.
    expect(peak).toBeGreaterThan(10);
    expect(peak).toBeLessThan(1e5);
    expect(physical.meta.normalisation).toBe("physical");
  });
});

describe("a fog bow: lognormal drops, median radius 10 µm", () => {
  const a = fog.spectral.anglesDeg;
  const lum = fog.colour.luminance;

  it("is broad and sits inside the rain bow", () => {
    // Fogbows are broad, nearly white and slightly inside the rain bow (common practice; the Airy shift of small drops).
    const peak = fog.bows.primaryDeg!;
    expect(peak).toBeGreaterThan(34);
    expect(peak).toBeLessThan(41);
    let width = 0;
    for (let i = 0; i < a.length; i++) if (lum[i] >= 0.5) width += 0.2;
    expect(width).toBeGreaterThan(4);
  });

  it("is nearly colourless at its peak compared with a rain bow", async () => {
    const rain = await profileOf({ spectral: { fromNm: 380, toNm: 780, stepNm: 20 } });
    const chromaOf = (r: Awaited<ReturnType<typeof profileOf>>, psi: number) => {
      const i = r.spectral.anglesDeg.findIndex((v) => Math.abs(v - psi) < 1e-9);
      const [R, G, B] = Array.from(r.colour.rgb.slice(3 * i, 3 * i + 3));
      return Math.max(R, G, B) - Math.min(R, G, B);
    };
    const fogChroma = chromaOf(fog, fog.bows.primaryDeg!);
    const rainChroma = Math.max(chromaOf(rain, 40.6), chromaOf(rain, 42.0));
    expect(fogChroma).toBeLessThan(0.1);
    expect(rainChroma).toBeGreaterThan(3 * fogChroma);
  });
});
