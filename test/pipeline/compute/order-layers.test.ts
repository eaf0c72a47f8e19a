import { describe, it, expect } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { skyRequestSchema, viewRequestSchema, imageQuerySchema } from "../../../schemas/view.js";
import { lutQuerySchema, lutRequestSchema } from "../../../schemas/lut.js";
import { encodeOverlay, prepareSky, prepareView, type ViewDeps } from "../../../pipeline/compute/view.js";
import { renderLut } from "../../../pipeline/render/lut-render.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { parseOrThrow } from "../../../pipeline/requests/parse-request.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";
import { skyManifestSchema, viewManifestSchema } from "../../../schemas/responses/overlay-response.js";
import { lutManifestSchema } from "../../../schemas/responses/lut-response.js";
import { LAYER_NAMES, withOrderLayers } from "../../../pipeline/compute/order-layers.js";
import { decodeScanlineExr, halfValue } from "../../helpers/exr-reader.js";
import { programRuns, skipWithout } from "../../helpers/tools.js";

const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });
const deps: ViewDeps = { kernels, limits: { maxTermAngles: Infinity } };
const COARSE = { spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
const DEG = Math.PI / 180;

/** Every channel of a by-order file: the combined ones and three per layer, sorted as OpenEXR stores them. */
const LAYERED = (whole: string[]) => [...whole, ...LAYER_NAMES.flatMap((n) => ["R", "G", "B"].map((c) => `${n}.${c}`))].sort();

/** Channel planes of an EXR file as numbers (half samples decoded from IEEE 754 binary16, test/helpers/exr-reader.ts). */
function planesOf(file: Buffer) {
  const exr = decodeScanlineExr(file);
  const values = new Map([...exr.planes].map(([name, bits]) => [name, Float64Array.from(bits, halfValue)]));
  return { exr, values };
}

/**
 * Each layer's channel against the combined one, sample by sample: R = Σ layer.R within the rounding of the six
 * stored half floats (each within 2^-11 relative of its value, IEEE 754-2008 §3.4 binary16, plus 2^-25 absolute
 * where it is subnormal). Returns the worst excess over that bound (≤ 0 passes).
 */
function worstSumExcess(values: Map<string, Float64Array>): number {
  let worst = -Infinity;
  for (const c of ["R", "G", "B"]) {
    const whole = values.get(c)!;
    const parts = LAYER_NAMES.map((n) => values.get(`${n}.${c}`)!);
    for (let k = 0; k < whole.length; k++) {
      let sum = 0;
      let magnitude = Math.abs(whole[k]);
      for (const part of parts) {
        sum += part[k];
        magnitude += Math.abs(part[k]);
      }
      const bound = 2 ** -11 * magnitude + 6 * 2 ** -25;
      worst = Math.max(worst, Math.abs(sum - whole[k]) - bound);
    }
  }
  return worst;
}

/** ψ of each pixel of an equirectangular map (the mapping the sky manifest states), from the antisolar direction. */
function skyPsiDeg(widthPx: number, heightPx: number, antisolar: readonly number[]): Float64Array {
  const out = new Float64Array(widthPx * heightPx);
  for (let y = 0; y < heightPx; y++) {
    for (let x = 0; x < widthPx; x++) {
      const az = (360 * (x + 0.5)) / widthPx - 180;
      const el = 90 - (180 * (y + 0.5)) / heightPx;
      const d = [Math.sin(az * DEG) * Math.cos(el * DEG), Math.cos(az * DEG) * Math.cos(el * DEG), Math.sin(el * DEG)];
      out[y * widthPx + x] = Math.acos(Math.max(-1, Math.min(1, d[0] * antisolar[0] + d[1] * antisolar[1] + d[2] * antisolar[2]))) / DEG;
    }
  }
  return out;
}

/**
 * Descartes' minimum-deviation angles ψ = 180° − Θ of the primary (k = 1) and secondary (k = 2) bows for index n:
 * cos² i = (n² − 1)/(k² + 2k), D = 2(i − r) + k(π − 2r) (Descartes 1637; van de Hulst 1957 §13.21).
 */
function descartesPsiDeg(n: number, k: number): number {
  const i = Math.acos(Math.sqrt((n * n - 1) / (k * k + 2 * k)));
  const r = Math.asin(Math.sin(i) / n);
  const d = (2 * (i - r) + k * (Math.PI - 2 * r)) % (2 * Math.PI);
  return 180 - (d > Math.PI ? 2 * Math.PI - d : d) / DEG;
}

/** Relative luminance of linear BT.709 RGB: Y = 0.2126 R + 0.7152 G + 0.0722 B (ITU-R BT.709-6, item 3.2). */
function luminanceAt(values: Map<string, Float64Array>, prefix: string, k: number): number {
  return 0.2126 * values.get(`${prefix}R`)![k] + 0.7152 * values.get(`${prefix}G`)![k] + 0.0722 * values.get(`${prefix}B`)![k];
}

describe("layers by scattering order (?layers=by-order): multi-layer OpenEXR", () => {
  it("sky map, 0.15 mm drops on Lorenz–Mie (Debye orders): the layers sum to the combined image within half-float rounding, and the primary is dark inside Alexander's band", async () => {
    const body = skyRequestSchema.parse({ scenario: { ...COARSE, method: "mie", drops: { kind: "monodisperse", radiusUm: 150, numberPerM3: 2000 } }, widthPx: 240, heightPx: 120, sun: { azimuthDeg: 180, elevationDeg: 5 } });
    const p = await prepareSky(body, "exr", deps, "by-order");
    const manifest = skyManifestSchema.parse(p.manifest);
    expect(manifest.layers?.channels).toEqual(LAYERED(["R", "G", "B", "A"]));
    const file = await encodeOverlay(p, "exr");
    const { exr, values } = planesOf(file.body);
    expect(exr.channels.map((c) => c.name)).toEqual(LAYERED(["R", "G", "B", "A"]));
    expect(exr.channels.every((c) => c.pixelType === 1)).toBe(true);
    expect(worstSumExcess(values)).toBeLessThanOrEqual(0);

    // Alexander's dark band between Descartes' primary and secondary angles for water at 550 nm, n = 1.334683
    // (IAPWS R9-97 at 20 °C, table in docs/checks.md); over the visible n spans 1.3305–1.3436 and the band's
    // middle moves by under 0.15°, well inside the ±1° window.
    const primaryDeg = descartesPsiDeg(1.334683, 1);
    const secondaryDeg = descartesPsiDeg(1.334683, 2);
    // Descartes' angles of that table: 41.834° and 51.331°.
    expect(primaryDeg).toBeCloseTo(41.834, 2);
    expect(secondaryDeg).toBeCloseTo(51.331, 2);
    const middle = (primaryDeg + secondaryDeg) / 2;
    const psi = skyPsiDeg(240, 120, manifest.antisolarPoint.direction);
    let peakPrimary = 0;
    let bandPrimary = 0;
    let bandWhole = Infinity;
    for (let k = 0; k < psi.length; k++) {
      if (values.get("A")![k] === 0) continue; // below the horizon (ground) or beyond the curtain
      peakPrimary = Math.max(peakPrimary, luminanceAt(values, "primary.", k));
      if (Math.abs(psi[k] - middle) < 1) {
        bandPrimary = Math.max(bandPrimary, luminanceAt(values, "primary.", k));
        bandWhole = Math.min(bandWhole, luminanceAt(values, "", k));
      }
    }
    expect(bandWhole).toBeLessThan(Infinity);
    // Goals: the primary layer in the band's middle 2° under 1e-3 of its peak and under 5 % of the whole image
    // there (reflection and transmission light the band). A 0.15 mm drop's Airy tail is ~1e-8 of the peak 4° out
    // (test/lib/bow/scattering-orders.test.ts); half floats and the sun's disc add no more.
    expect(bandPrimary).toBeLessThan(1e-3 * peakPrimary);
    expect(bandPrimary).toBeLessThan(0.05 * bandWhole);
    // The primary layer carries the primary bow: its brightest pixels lie within 1° of Descartes' angle.
    let brightest = 0;
    for (let k = 0; k < psi.length; k++) if (values.get("A")![k] > 0 && luminanceAt(values, "primary.", k) > luminanceAt(values, "primary.", brightest)) brightest = k;
    expect(Math.abs(psi[brightest] - primaryDeg)).toBeLessThan(1);
  });

  it("camera view, 0.5 mm drops on the Airy engine, additive layer with a polariser: the layers sum to the combined RGB", async () => {
    const body = viewRequestSchema.parse({
      scenario: { ...COARSE, method: "airy", drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 } },
      camera: { widthPx: 96, heightPx: 54 },
      layer: "additive",
      polariserDeg: 30,
      output: { space: "xyz-d65" },
    });
    const p = await prepareView(body, "exr", deps, "by-order");
    viewManifestSchema.parse(p.manifest);
    // xyz-d65 has no gamut to map into (output-spaces.ts), so no sample is changed apart from the others.
    const { exr, values } = planesOf((await encodeOverlay(p, "exr")).body);
    expect(exr.channels.map((c) => c.name)).toEqual(LAYERED(["R", "G", "B"]));
    expect(worstSumExcess(values)).toBeLessThanOrEqual(0);
    // The Airy engine's orders add incoherently: the remainder is orders 4–6 only, never negative beyond the
    // rounding of the half floats it is the difference of (2^-11 of the combined value, ≤ 1 here: 5e-4).
    for (const c of ["R", "G", "B"]) for (const v of values.get(`higher.${c}`)!) expect(v).toBeGreaterThan(-5e-4);
    expect(p.profile.meta.method.engines.map((e) => e.engine)).toEqual(["airy"]);
    // And the named layers are never negative (no gamut mapping, no interference).
    for (const n of ["reflection", "transmission", "primary", "secondary"]) for (const c of ["R", "G", "B"]) expect(Math.min(...values.get(`${n}.${c}`)!)).toBeGreaterThanOrEqual(0);
  });

  it.skipIf(skipWithout(programRuns("exrheader", ["--help"])))("exrheader lists the combined channels and the five layers' channels, all half", async () => {
    const body = viewRequestSchema.parse({ scenario: { ...COARSE, drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 } }, camera: { widthPx: 48, heightPx: 27 } });
    const file = await encodeOverlay(await prepareView(body, "exr", deps, "by-order"), "exr");
    const dir = mkdtempSync(join(tmpdir(), "antisolar-layers-"));
    try {
      const path = join(dir, "layers.exr");
      writeFileSync(path, file.body);
      const result = spawnSync("exrheader", [path], { encoding: "utf8" });
      expect(result.status, result.stderr).toBe(0);
      const listed = [...result.stdout.matchAll(/^\s+([\w.]+), 16-bit floating-point, sampling 1 1$/gm)].map((m) => m[1]);
      expect(listed).toEqual(LAYERED(["R", "G", "B", "A"]));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("combined images are unchanged by an earlier by-order render of the same scene (order rows are cached apart)", async () => {
    const body = viewRequestSchema.parse({ scenario: { ...COARSE, drops: { kind: "monodisperse", radiusUm: 40, numberPerM3: 50000 } }, camera: { widthPx: 48, heightPx: 27 } });
    const fresh = new KernelService({ memoryBudgetBytes: 2 ** 28, compute: createInlinePool().compute });
    const before = (await encodeOverlay(await prepareView(body, "exr", { ...deps, kernels: fresh }), "exr")).body;
    const layered = await prepareView(body, "exr", { ...deps, kernels: fresh }, "by-order");
    expect(layered.profile.meta.kernel.computed).toBeGreaterThan(0); // the order rows, new
    const after = await prepareView(body, "exr", { ...deps, kernels: fresh });
    expect(after.profile.meta.kernel.computed).toBe(0);
    expect((await encodeOverlay(after, "exr")).body.equals(before)).toBe(true);
    const again = await prepareView(body, "exr", { ...deps, kernels: fresh }, "by-order");
    expect(again.profile.meta.kernel.computed).toBe(0);
  });

  it("lookup texture by order: R, G, B, A and the layers; the layers sum to the combined texels", async () => {
    const request = lutRequestSchema.parse({ scenario: COARSE, angles: { fromDeg: 35, toDeg: 55, texels: 64 }, sizes: { kind: "radius", fromUm: 30, toUm: 800, texels: 3 } });
    const out = await renderLut(request, lutQuerySchema.parse({ layers: "by-order" }), { kernels, maxTermAngles: Infinity });
    const { exr, values } = planesOf(out.body as Buffer);
    expect(exr.channels.map((c) => c.name)).toEqual(LAYERED(["R", "G", "B", "A"]));
    expect(worstSumExcess(values)).toBeLessThanOrEqual(0);
    const manifest = await renderLut(request, lutQuerySchema.parse({ layers: "by-order", part: "manifest" }), { kernels, maxTermAngles: Infinity });
    expect(lutManifestSchema.parse(JSON.parse(String(manifest.body))).layers?.kind).toBe("by-order");
  });

  it("the remainder layer is the combined minus the named layers, sample by sample", () => {
    const whole = Float32Array.of(1, 2, 3, 0.5, 4, 5, 6, 0.25);
    const parts = [0, 1, 2, 3].map((o) => Float32Array.of(0.1 * o, 0.2, 0.3, 0.01, 0.02, 0.03));
    const { channels, data } = withOrderLayers(whole, ["R", "G", "B", "A"], parts, 2);
    expect(channels.slice(0, 4)).toEqual(["R", "G", "B", "A"]);
    expect(channels.slice(-3)).toEqual(["higher.R", "higher.G", "higher.B"]);
    expect(data[channels.length - 3]).toBeCloseTo(1 - 0.6, 6);
    expect(data[2 * channels.length - 1]).toBeCloseTo(6 - 4 * 0.03, 6);
  });
});

describe("layers: refused where they cannot be carried", () => {
  it("a format without layers is a 400 naming the query field `layers` and the allowed format", () => {
    for (const [schema, format] of [[imageQuerySchema, "png"], [imageQuerySchema, "hdr"], [imageQuerySchema, "png16"], [lutQuerySchema, "ktx2"], [lutQuerySchema, "json"], [lutQuerySchema, "hdr"]] as const) {
      let error: unknown;
      try {
        parseOrThrow(schema, { format, layers: "by-order" }, "query");
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(ClientError);
      expect((error as ClientError).status).toBe(400);
      expect((error as ClientError).message).toMatch(/layers/);
      expect((error as ClientError).message).toMatch(/exr/);
    }
    expect(parseOrThrow(imageQuerySchema, { format: "exr", layers: "by-order" }, "query").layers).toBe("by-order");
    // Left out, the query parses as before (no default written into it: job hashes stay as they were).
    expect(parseOrThrow(imageQuerySchema, {}, "query")).toEqual({ format: "exr", part: "image" });
  });

  it("a time-of-day texture by order is a 400 naming `layers` (and sunElevations in the message)", async () => {
    const request = lutRequestSchema.parse({ sunElevations: { fromDeg: 5, toDeg: 30, slices: 2 } });
    await expect(renderLut(request, lutQuerySchema.parse({ layers: "by-order" }), { kernels, maxTermAngles: Infinity })).rejects.toMatchObject({ status: 400, details: { field: "layers" }, message: expect.stringMatching(/sunElevations/) });
  });

  it("flattened drops by order are a 400 naming `layers` (the order rows are for spheres), before any computing", async () => {
    const body = viewRequestSchema.parse({ scenario: { drops: { kind: "monodisperse", radiusUm: 1500, numberPerM3: 100, shape: { kind: "equilibrium" } } }, camera: { widthPx: 16, heightPx: 9 } });
    await expect(prepareView(body, "exr", deps, "by-order")).rejects.toMatchObject({ status: 400, details: { field: "layers" }, message: expect.stringMatching(/scenario\.drops\.shape/) });
  });

  it("an image above the layered pixel limit is a 400 naming `layers`, before any computing", async () => {
    const body = skyRequestSchema.parse({ widthPx: 4096, heightPx: 2048 });
    await expect(prepareSky(body, "exr", deps, "by-order")).rejects.toMatchObject({ status: 400, details: { field: "layers" } });
  });
});
