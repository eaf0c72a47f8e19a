// Rough water below the horizon (Cox & Munk 1954 slopes): the reflection bow blurs over the glitter's spread of
// reflected-light directions, the direct bow stays as it is, and bad wind speeds are refused naming the field.
import { describe, it, expect, beforeAll } from "vitest";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { skyRequestSchema } from "../../../schemas/view.js";
import { prepareSky, renderPrepared, type ViewDeps, type PreparedOverlay } from "../../../pipeline/compute/view.js";
import { skyManifestSchema } from "../../../schemas/responses/overlay-response.js";
import { glitterOf } from "../../../lib/view/glitter.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";

const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });
const deps: ViewDeps = { kernels, limits: { maxTermAngles: Infinity } };

// 0.5 mm drops (Airy theory under "auto") on a 20 nm grid; the sun in the south at 8°; a 1°-per-row sky map.
const scenario = { drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
const SUN_ELEVATION_DEG = 8;
const W = 360;
const H = 180;
const base = { scenario, sun: { azimuthDeg: 180, elevationDeg: SUN_ELEVATION_DEG }, widthPx: W, heightPx: H, layer: "additive", output: { space: "xyz-d65" } };
/** The column just east of north: the vertical through the antisolar point and the reflection bows' centres. */
const NORTH = W / 2;
const elevationOfRow = (y: number) => 90 - (180 * (y + 0.5)) / H;

/** The same prepared overlay with the reflected sunlight taken away (every glitter group's share set to 0). */
function withoutReflectedSun(p: PreparedOverlay): PreparedOverlay {
  const water = p.scene.water!;
  const rough = water.rough && { ...water.rough, surfaces: water.rough.surfaces.map((s) => ({ ...s, sunRs: 0, sunRp: 0 })) };
  return { ...p, scene: { ...p.scene, water: { ...water, sunRs: 0, sunRp: 0, rough } } };
}

/** Y along the north column above the horizon of the reflection bow alone (the render less the one without reflected sun). */
function reflectionColumn(p: PreparedOverlay): { elevationDeg: number; y: number }[] {
  const all = renderPrepared(p).data;
  const direct = renderPrepared(withoutReflectedSun(p)).data;
  const out: { elevationDeg: number; y: number }[] = [];
  for (let row = 0; row < H / 2; row++) {
    const at = (row * W + NORTH) * 3 + 1;
    out.push({ elevationDeg: elevationOfRow(row), y: all[at] - direct[at] });
  }
  return out;
}

/** The reflection bow's primary near its top (elevations 30°–80°): peak Y and the Y-weighted RMS width about the peak. */
function primaryShape(column: { elevationDeg: number; y: number }[]): { peak: number; widthDeg: number; peakDeg: number } {
  const part = column.filter((c) => c.elevationDeg > 30 && c.elevationDeg < 80);
  const top = part.reduce((a, c) => (c.y > a.y ? c : a));
  const sum = part.reduce((a, c) => a + c.y, 0);
  const mean = part.reduce((a, c) => a + c.y * c.elevationDeg, 0) / sum;
  const widthDeg = Math.sqrt(part.reduce((a, c) => a + c.y * (c.elevationDeg - mean) ** 2, 0) / sum);
  return { peak: top.y, widthDeg, peakDeg: top.elevationDeg };
}

let calm: PreparedOverlay;
let light: PreparedOverlay;
let strong: PreparedOverlay;
beforeAll(async () => {
  calm = await prepareSky(skyRequestSchema.parse({ ...base, waterSurface: { kind: "calm" } }), "exr", deps);
  light = await prepareSky(skyRequestSchema.parse({ ...base, waterSurface: { kind: "rough", windSpeedMs: 2 } }), "exr", deps);
  strong = await prepareSky(skyRequestSchema.parse({ ...base, waterSurface: { kind: "rough", windSpeedMs: 10 } }), "exr", deps);
}, 180_000);

describe("rough water", () => {
  it("states the water model and Cox & Munk's σ² in the manifest", () => {
    const manifest = skyManifestSchema.parse(strong.manifest);
    expect(manifest.waterSurface?.kind).toBe("rough");
    // Cox & Munk 1954: σ² = 0.003 + 5.12e-3 · 10.
    expect(manifest.waterSurface?.rough?.meanSquareSlope).toBeCloseTo(0.0542, 12);
    expect(manifest.waterSurface?.rough?.windSpeedMs).toBe(10);
    expect(skyManifestSchema.parse(calm.manifest).waterSurface?.rough).toBeUndefined();
  });

  it("blurs the reflection bow: broader and with a lower peak at 10 m/s than at 2 m/s, both against calm water", () => {
    const shapes = [calm, light, strong].map((p) => primaryShape(reflectionColumn(p)));
    console.log(
      "reflection bow's primary near its top (calm, 2 m/s, 10 m/s): " +
        shapes.map((s) => `peak Y ${s.peak.toExponential(3)} at ${s.peakDeg}°, RMS width ${s.widthDeg.toFixed(2)}°`).join("; "),
    );
    const [c, l, s] = shapes;
    // Calm water: the top of the reflection bow's primary at 8° + ~42° (the mirrored antisolar point plus the bow's radius).
    expect(c.peakDeg).toBeGreaterThan(48);
    expect(c.peakDeg).toBeLessThan(52);
    expect(l.peak).toBeLessThan(c.peak);
    expect(s.peak).toBeLessThan(l.peak);
    expect(l.widthDeg).toBeGreaterThan(c.widthDeg);
    expect(s.widthDeg).toBeGreaterThan(l.widthDeg);
  });

  it("leaves the direct bow above the horizon unchanged bit for bit", () => {
    // Without water the rain above the horizon shows the direct bow alone; rough water with its reflected sunlight
    // taken away must draw exactly that above the horizon (same colours: only the water differs).
    const noWater = renderPrepared({ ...strong, scene: { ...strong.scene, water: undefined, ground: false } }).data;
    const roughDirect = renderPrepared(withoutReflectedSun(strong)).data;
    const upper = (H / 2) * W * 3;
    expect(Buffer.from(roughDirect.buffer, 0, upper * 4).equals(Buffer.from(noWater.buffer, 0, upper * 4))).toBe(true);
    let lit = 0;
    for (let k = 1; k < upper; k += 3) if (noWater[k] > 0) lit++;
    expect(lit).toBeGreaterThan(100);
  });

  it("gathers the glitter in 1° bins: within 1e-2 of the image's peak Y of 0.5° bins (derived: measured here)", () => {
    // The light of each group travels at its weighted mean elevation; finer bins only split the same facets.
    const water = strong.scene.water!;
    const sun = strong.scene.sunDirection;
    const fine = glitterOf(sun, water.refractiveIndex, water.rough!.meanSquareSlope, 0.5);
    const finer = { ...strong, scene: { ...strong.scene, water: { ...water, rough: { ...water.rough!, surfaces: fine.samples.map((g) => ({ ...water.rough!.surfaces[0], reflectedAntisolar: g.direction, sunRs: g.rs, sunRp: g.rp })) } } } };
    expect(fine.samples.length).toBeGreaterThan(1.5 * water.rough!.surfaces.length);
    const a = renderPrepared(strong).data;
    const b = renderPrepared(finer).data;
    let peak = 0;
    let worst = 0;
    for (let k = 1; k < a.length; k += 3) {
      peak = Math.max(peak, b[k]);
      worst = Math.max(worst, Math.abs(a[k] - b[k]));
    }
    console.log(`1° against 0.5° glitter bins: largest |ΔY| ${(worst / peak).toExponential(2)} of the peak`);
    expect(worst / peak).toBeLessThan(1e-2);
  });

  it("sends a rough-water image over the synchronous budget to a job (422 too-costly), and draws one within it", async () => {
    const big = skyRequestSchema.parse({ ...base, widthPx: 2048, heightPx: 1024, waterSurface: { kind: "rough", windSpeedMs: 10 } });
    const refused = await prepareSky(big, "exr", { kernels, limits: { maxTermAngles: 3e9 } }).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(ClientError);
    expect((refused as ClientError).code).toBe("too-costly");
    expect((refused as ClientError).message).toMatch(/POST \/v1\/jobs/);
    const small = await prepareSky(skyRequestSchema.parse({ ...base, waterSurface: { kind: "rough", windSpeedMs: 10 } }), "exr", { kernels, limits: { maxTermAngles: 3e9 } });
    expect(small.scene.water?.rough).toBeDefined();
  });

  it("refuses wind speeds outside Cox & Munk's 1–14 m/s, and rough water without a wind speed, naming the field", () => {
    for (const windSpeedMs of [0.5, 14.5]) {
      const parsed = skyRequestSchema.safeParse({ ...base, waterSurface: { kind: "rough", windSpeedMs } });
      expect(parsed.success).toBe(false);
      expect(parsed.error?.issues[0].path).toEqual(["waterSurface", "windSpeedMs"]);
      expect(parsed.error?.issues[0].message).toMatch(windSpeedMs < 1 ? /1/ : /14/);
    }
    const missing = skyRequestSchema.safeParse({ ...base, waterSurface: { kind: "rough" } });
    expect(missing.success).toBe(false);
    expect(missing.error?.issues[0].path).toEqual(["waterSurface", "windSpeedMs"]);
  });
});
