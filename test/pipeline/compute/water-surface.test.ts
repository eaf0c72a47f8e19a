// Calm water below the horizon: the reflection bow (centre and radius from the geometry of a level mirror, and its
// brightness from the Fresnel reflectances of water) and the bows mirrored in the water.
import { describe, it, expect, beforeAll } from "vitest";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { skyRequestSchema } from "../../../schemas/view.js";
import { prepareSky, renderPrepared, type ViewDeps, type PreparedOverlay } from "../../../pipeline/compute/view.js";
import { skyManifestSchema } from "../../../schemas/responses/overlay-response.js";

const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });
const deps: ViewDeps = { kernels, limits: { maxTermAngles: Infinity } };

// 0.5 mm drops (Airy theory under "auto") on a 20 nm grid; the sun low in the south.
const scenario = { drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
const SUN_ELEVATION_DEG = 8;
const W = 720;
const H = 360;
const base = { scenario, sun: { azimuthDeg: 180, elevationDeg: SUN_ELEVATION_DEG }, widthPx: W, heightPx: H, layer: "additive", output: { space: "xyz-d65" } };

/** Fresnel's power reflectances for light from air onto water (Born & Wolf 1999 §1.5.2, Eqs. 21 squared), written here. */
function fresnel(n: number, incidenceDeg: number): { s: number; p: number } {
  const i = (incidenceDeg * Math.PI) / 180;
  const t = Math.asin(Math.sin(i) / n);
  const s = Math.sin(i - t) / Math.sin(i + t);
  const p = Math.tan(i - t) / Math.tan(i + t);
  return { s: s * s, p: p * p };
}

/** Row whose centre has this elevation (equirectangular: elevation 90° − 180°·(y + 0.5)/H). */
const rowAt = (elevationDeg: number) => Math.round(((90 - elevationDeg) / 180) * H - 0.5);
const elevationOfRow = (y: number) => 90 - (180 * (y + 0.5)) / H;
/** The column just east of north (azimuth +0.25°): the vertical through the antisolar point. */
const NORTH = W / 2;

let plain: PreparedOverlay;
let plainData: Float32Array;
let water: PreparedOverlay;
let waterData: Float32Array;
let tangential: Float32Array;
beforeAll(async () => {
  plain = await prepareSky(skyRequestSchema.parse({ ...base, ground: false }), "exr", deps);
  plainData = renderPrepared(plain).data;
  water = await prepareSky(skyRequestSchema.parse({ ...base, waterSurface: { kind: "calm" } }), "exr", deps);
  waterData = renderPrepared(water).data;
  // The direct bow through a polariser along the bow's tangent: its tangentially polarised part.
  const polarised = await prepareSky(skyRequestSchema.parse({ ...base, ground: false, polariserToTangentDeg: 0 }), "exr", deps);
  tangential = renderPrepared(polarised).data;
}, 120_000);

/** Brightest row of the column between two elevations. */
function peakRow(data: Float32Array, fromDeg: number, toDeg: number, subtract?: Float32Array): number {
  let best = -1;
  let bestY = -1;
  for (let y = rowAt(toDeg); y <= rowAt(fromDeg); y++) {
    const v = data[(y * W + NORTH) * 3 + 1] - (subtract ? subtract[(y * W + NORTH) * 3 + 1] : 0);
    if (v > best) {
      best = v;
      bestY = y;
    }
  }
  return bestY;
}

describe("a calm water surface", () => {
  it("adds a reflection bow as far above the horizon as the antisolar point is below it, with the direct bow's radius", () => {
    const manifest = skyManifestSchema.parse(water.manifest);
    expect(manifest.waterSurface?.reflectionBowCentre.elevationDeg).toBeCloseTo(SUN_ELEVATION_DEG, 9);
    expect(manifest.waterSurface?.reflectionBowCentre.azimuthDeg).toBeCloseTo(0, 9);
    // The primary's top: the direct bow's at ψ − e, the reflection bow's (seen in the difference) at ψ + e.
    const direct = peakRow(plainData, 25, 45);
    const reflection = peakRow(waterData, 40, 60, plainData);
    const radiusDirect = elevationOfRow(direct) + SUN_ELEVATION_DEG;
    const radiusReflection = elevationOfRow(reflection) - SUN_ELEVATION_DEG;
    // One row is 0.5°: the two tops fall on rows 2e apart exactly.
    expect(radiusReflection).toBeCloseTo(radiusDirect, 9);
    expect(radiusDirect).toBeGreaterThan(40);
    expect(radiusDirect).toBeLessThan(43);
  });

  it("is as bright as the direct bow times the water's Fresnel reflectance for each polarisation", () => {
    const manifest = skyManifestSchema.parse(water.manifest);
    const n = manifest.waterSurface!.refractiveIndex;
    // The index of water at 555 nm near 15 °C is 1.334 (IAPWS R9-97); the reflectances are computed here from it.
    expect(n).toBeGreaterThan(1.33);
    expect(n).toBeLessThan(1.34);
    const r = fresnel(n, 90 - SUN_ELEVATION_DEG);
    expect(manifest.waterSurface!.sunReflectance.s).toBeCloseTo(r.s, 9);
    expect(manifest.waterSurface!.sunReflectance.p).toBeCloseTo(r.p, 9);
    const y = peakRow(plainData, 25, 45);
    const yReflection = y - 2 * SUN_ELEVATION_DEG * (H / 180);
    const directTotal = plainData[(y * W + NORTH) * 3 + 1];
    const directTangential = tangential[(y * W + NORTH) * 3 + 1];
    const f = directTangential / directTotal;
    // A rainbow is strongly polarised along its tangent (about 96 % for the primary: Können 1985, Polarized Light in
    // Nature, ch. 10, from memory).
    expect(f).toBeGreaterThan(0.9);
    const reflectionBow = waterData[(yReflection * W + NORTH) * 3 + 1] - plainData[(yReflection * W + NORTH) * 3 + 1];
    // At the top the scattering plane is vertical, so the water's s field (horizontal) lies along the bow's tangent.
    const expected = r.s * f + r.p * (1 - f);
    console.log(`reflection bow / direct bow at the top: ${(reflectionBow / directTotal).toFixed(5)}; Fresnel Rs·f + Rp·(1 − f) = ${expected.toFixed(5)} (Rs ${r.s.toFixed(4)}, Rp ${r.p.toFixed(4)}, f ${f.toFixed(4)})`);
    expect(Math.abs(reflectionBow / directTotal - expected) / expected).toBeLessThan(0.02);
    // Not the unpolarised reflectance: the bow's polarisation matters at this incidence.
    expect(Math.abs(reflectionBow / directTotal - (r.s + r.p) / 2) / expected).toBeGreaterThan(0.1);
  });

  it("shows the sky's bows mirrored below the horizon, dimmed between Rp and Rs of the view ray's incidence", () => {
    const n = water.manifest.waterSurface!.refractiveIndex;
    for (const elevationDeg of [20.25, 30.25, 35.25]) {
      const up = rowAt(elevationDeg);
      const down = rowAt(-elevationDeg);
      expect(elevationOfRow(down)).toBeCloseTo(-elevationOfRow(up), 9);
      const sky = waterData[(up * W + NORTH) * 3 + 1];
      const mirrored = waterData[(down * W + NORTH) * 3 + 1];
      const r = fresnel(n, 90 - elevationOfRow(up));
      expect(sky).toBeGreaterThan(0);
      expect(mirrored / sky).toBeGreaterThanOrEqual(r.p * (1 - 1e-9));
      expect(mirrored / sky).toBeLessThanOrEqual(r.s * (1 + 1e-9));
    }
  });

  it("refuses a polariser at a fixed angle to the bow's tangent together with water, naming the field", () => {
    const parsed = skyRequestSchema.safeParse({ ...base, waterSurface: { kind: "calm" }, polariserToTangentDeg: 0 });
    expect(parsed.success).toBe(false);
    expect(parsed.error?.issues[0].path).toEqual(["polariserToTangentDeg"]);
  });
});
