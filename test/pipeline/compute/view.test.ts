import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import sharp from "sharp";
import Fastify, { type FastifyInstance } from "fastify";
import request from "supertest";
import { viewRequestSchema, skyRequestSchema } from "../../../schemas/view.js";
import { prepareView, prepareSky, encodeOverlay, renderPrepared, type ViewDeps } from "../../../pipeline/compute/view.js";
import { viewRoutes } from "../../../http/routes/view.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { parseOrThrow } from "../../../pipeline/requests/parse-request.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";
import { loadConfig } from "../../../pipeline/config/config.js";
import { tangentTransmission } from "../../../lib/view/layer.js";
import { computeLut } from "../../../pipeline/compute/lut.js";
import { lutRequestSchema } from "../../../schemas/lut.js";
import { extinctionEfficiency, opticalThickness } from "../../../lib/bow/extinction.js";
import { viewManifestSchema } from "../../../schemas/responses/overlay-response.js";
import { latticeRadiusQuadrature } from "../../../lib/drops/lattice-quadrature.js";

const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });
const deps: ViewDeps = { kernels, limits: { maxTermAngles: Infinity } };

// One cheap scene for every check: 0.5 mm drops (served by Airy theory under "auto") on a 20 nm grid.
const scenario = { drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
const DEG = Math.PI / 180;

/** An OpenEXR header attribute of type string: name NUL, type NUL, int32 size, the bytes (OpenEXR file layout). */
function exrStringAttribute(name: string, value: string): Buffer {
  const size = Buffer.alloc(4);
  size.writeInt32LE(Buffer.byteLength(value));
  return Buffer.concat([Buffer.from(`${name}\0string\0`), size, Buffer.from(value)]);
}

/** Relative luminance of linear BT.709 RGB: Y = 0.2126 R + 0.7152 G + 0.0722 B (ITU-R BT.709-6, item 3.2). */
function luminance(data: Float32Array, at: number): number {
  return 0.2126 * data[at] + 0.7152 * data[at + 1] + 0.0722 * data[at + 2];
}

/** Index of the brightest of values[from..to). */
function argmax(values: (i: number) => number, from: number, to: number): number {
  let best = from;
  for (let i = from; i < to; i++) if (values(i) > values(best)) best = i;
  return best;
}

describe("camera geometry (world x east, y north, z up; azimuth clockwise from north)", () => {
  // Sun at azimuth 200°, 20° high; the camera looks straight at the antisolar point: yaw 20°, pitch −20°.
  // 201 × 201 pixels: the antisolar point falls on the centre of pixel (100, 100), and row 100 runs through it,
  // so pixel x of that row lies r = x − 100 pixels from the antisolar point.
  const sun = { azimuthDeg: 200, elevationDeg: 20 };
  const looking = { yawDeg: 20, pitchDeg: -20, widthPx: 201, heightPx: 201 };

  async function rowThroughCentre(camera: object) {
    const body = viewRequestSchema.parse({ scenario, sun, camera, ground: false, layer: "additive" });
    const p = await prepareView(body, "exr", deps);
    const layer = renderPrepared(p);
    const primaryDeg = (p.manifest.profile as { bows: { primaryDeg: number } }).bows.primaryDeg;
    const row = 100;
    // Search outwards from the centre, inside the dark band (secondary lies beyond 50°).
    const lum = (x: number) => luminance(layer.data, 3 * (row * 201 + x));
    return { primaryDeg, lum };
  }

  it("rectilinear: the primary lies at r = f·tan ψ, f = (W/2)/tan(hfov/2)", async () => {
    // Worked by hand for hfov = 90°, W = 201: f = 100.5/tan 45° = 100.5 px; at ψ = 42°, r = 100.5 × tan 42° =
    // 100.5 × 0.9004 = 90.5 px (r = f·ψ would give 73.7 px, so a wrong projection fails by 17 px).
    const { primaryDeg, lum } = await rowThroughCentre({ ...looking, projection: "rectilinear", horizontalFovDeg: 90 });
    // Descartes' primary for water (n = 4/3): 42.03° (computed, docs/checks.md); Airy's maximum lies
    // a little inside it for 0.5 mm drops, so ±1° holds it.
    expect(Math.abs(primaryDeg - 42)).toBeLessThan(1);
    const f = 100.5 / Math.tan(45 * DEG);
    const expectedR = f * Math.tan(primaryDeg * DEG);
    expect(Math.abs(f * Math.tan(42 * DEG) - 90.49)).toBeLessThan(0.01);
    const r = argmax((i) => lum(100 + i), 60, 100);
    // One pixel: the brightest pixel is the nearest to the peak (±½ px) plus the profile's 0.1° step (0.2 px here).
    expect(Math.abs(r - expectedR)).toBeLessThanOrEqual(1);
    // Same on the left: the bow is a circle about the centre.
    const rLeft = argmax((i) => lum(100 - i), 60, 100);
    expect(rLeft).toBe(r);
  });

  it("equidistant fisheye: the primary lies at r = f·ψ, f = (W/2)/(hfov/2 in radians)", async () => {
    // By hand for hfov = 180°, W = 201: f = 100.5/(π/2) = 63.98 px per radian; ψ = 42° = 0.7330 rad → r = 46.9 px
    // (the rectilinear rule would give 57.6 px).
    const { primaryDeg, lum } = await rowThroughCentre({ ...looking, projection: "fisheye", horizontalFovDeg: 180 });
    const f = 100.5 / (Math.PI / 2);
    expect(Math.abs(f * 42 * DEG - 46.9)).toBeLessThan(0.05);
    const r = argmax((i) => lum(100 + i), 30, 60);
    expect(Math.abs(r - f * primaryDeg * DEG)).toBeLessThanOrEqual(1);
  });

  it("focal length and sensor width give the same camera as the field of view they imply", async () => {
    // 18 mm on a 36 mm sensor: tan(hfov/2) = 18/18 → hfov = 90° (similar triangles).
    const a = await prepareView(viewRequestSchema.parse({ scenario, sun, camera: { ...looking, focalLengthMm: 18, sensorWidthMm: 36 } }), "exr", deps);
    const cam = viewManifestSchema.parse(a.manifest).camera;
    expect(cam.focalPx).toBeCloseTo(100.5, 9);
    expect(cam.horizontalFovDeg).toBeCloseTo(90, 9);
  });
});

describe("horizon and layers", () => {
  // Sun 20° high at azimuth 180° (south); camera level (pitch 0, roll 0) looking north. A level rectilinear camera
  // sees z < 0 exactly in the rows below the image centre: rows 50..99 of 100.
  const base = { scenario, sun: { azimuthDeg: 180, elevationDeg: 20 }, camera: { widthPx: 160, heightPx: 100, yawDeg: 0, pitchDeg: 0, horizontalFovDeg: 120 } };

  it("with ground, nothing below the horizon; above it RGB light and A = 1 − T", async () => {
    const p = await prepareView(viewRequestSchema.parse(base), "exr", deps);
    const layer = renderPrepared(p);
    expect(layer.channels).toBe(4);
    const alpha = p.alpha!;
    const T = (p.manifest.layer as { curtain: { transmittance: number } }).curtain.transmittance;
    expect(alpha).toBeCloseTo(1 - T, 12);
    for (let y = 0; y < 100; y++) {
      for (let x = 0; x < 160; x++) {
        const at = 4 * (y * 160 + x);
        if (y >= 50) for (let k = 0; k < 4; k++) expect(layer.data[at + k]).toBe(0);
        else expect(layer.data[at + 3]).toBe(Math.fround(alpha));
      }
    }
    // The primary crosses the vertical centre line where its elevation is ψ − 20° ≈ 22°: light there.
    const lit = Array.from({ length: 50 }, (_, y) => luminance(layer.data, 4 * (y * 160 + 80)));
    expect(Math.max(...lit)).toBeGreaterThan(0.5);
  });

  it("ground: false lets the bows continue below the horizon", async () => {
    const p = await prepareView(viewRequestSchema.parse({ ...base, ground: false, layer: "additive" }), "exr", deps);
    const layer = renderPrepared(p);
    expect(layer.channels).toBe(3);
    let below = 0;
    for (let y = 50; y < 100; y++) for (let x = 0; x < 160; x++) below = Math.max(below, luminance(layer.data, 3 * (y * 160 + x)));
    expect(below).toBeGreaterThan(0.1);
  });

  it("a polariser along the image horizontal passes the top of the bow and blocks its sides", async () => {
    // Bow light is polarised along the bow (Können & de Boer 1979, Appl. Opt. 18, 1961); the primary about 96 %
    // (Können 1985, from memory).
    // The top of the bow has a horizontal tangent, its sides a vertical one, so with the axis horizontal the top
    // keeps (1 + P)/2 and the sides (1 − P)/2: a ratio above 5 means P > 2/3, far from the 1 of no polariser.
    const sun = { azimuthDeg: 200, elevationDeg: 20 };
    const camera = { yawDeg: 20, pitchDeg: -20, widthPx: 201, heightPx: 201, horizontalFovDeg: 120 };
    const p = await prepareView(viewRequestSchema.parse({ scenario, sun, camera, ground: false, layer: "additive", polariserDeg: 0 }), "exr", deps);
    const layer = renderPrepared(p);
    const lum = (x: number, y: number) => luminance(layer.data, 3 * (y * 201 + x));
    const top = Math.max(...Array.from({ length: 100 }, (_, i) => lum(100, i)));
    const side = Math.max(...Array.from({ length: 100 }, (_, i) => lum(101 + i, 100)));
    expect(top / side).toBeGreaterThan(5);
    // The rule itself: tangent t = a × d; top of the bow (d above a) has t horizontal.
    const a = [0, 1, 0];
    const up = [0, Math.cos(42 * DEG), Math.sin(42 * DEG)];
    expect(tangentTransmission(up, a, [1, 0, 0])).toBeCloseTo(1, 12);
    expect(tangentTransmission(up, a, [0, -Math.sin(42 * DEG), Math.cos(42 * DEG)])).toBeCloseTo(0, 12);
  });
});

describe("sky map (equirectangular: azimuth −180°..180° left to right with north in the middle, zenith at the top)", () => {
  it("puts the primary at the elevation spherical trigonometry predicts, in two columns", async () => {
    const h = 20;
    const W = 720;
    const H = 360;
    const p = await prepareSky(skyRequestSchema.parse({ scenario, sun: { azimuthDeg: 240, elevationDeg: h }, widthPx: W, heightPx: H, layer: "additive" }), "exr", deps);
    const layer = renderPrepared(p);
    const psi = (p.manifest.profile as { bows: { primaryDeg: number } }).bows.primaryDeg;
    // Column x has its centre at azimuth 360·(x + ½)/W − 180; antisolar azimuth 60° is between columns 479 and 480.
    for (const x of [479, 509]) {
      const azDeg = (360 * (x + 0.5)) / W - 180;
      const dAz = (azDeg - 60) * DEG;
      // Spherical law of cosines with the antisolar point at elevation −h: cos ψ = cos h cos e cos Δaz − sin h sin e.
      // Solve for the bow's elevation e by bisection over 0..90° (the left side falls as e grows).
      const f = (e: number) => Math.cos(h * DEG) * Math.cos(e) * Math.cos(dAz) - Math.sin(h * DEG) * Math.sin(e) - Math.cos(psi * DEG);
      let lo = 0;
      let hi = Math.PI / 2;
      for (let k = 0; k < 60; k++) {
        const mid = (lo + hi) / 2;
        if (f(mid) > 0) lo = mid;
        else hi = mid;
      }
      const expectedRow = ((90 - lo / DEG) / 180) * H - 0.5;
      const row = argmax((y) => luminance(layer.data, 3 * (y * W + x)), 0, H / 2);
      // Rows are 0.5° apart; the brightest row is within a row of the peak (±½ row, plus the 0.1° profile step).
      expect(Math.abs(row - expectedRow)).toBeLessThanOrEqual(1);
    }
    // The map's lower half (below the horizon) is empty with ground on.
    let below = 0;
    for (let i = 3 * W * (H / 2); i < layer.data.length; i++) below = Math.max(below, layer.data[i]);
    expect(below).toBe(0);
  });

  it("a polariser across the bow's tangent dims the bow in the sky map by Malus's law", async () => {
    const body = (extra: object) => skyRequestSchema.parse({ scenario, sun: { azimuthDeg: 240, elevationDeg: 20 }, widthPx: 180, heightPx: 90, layer: "additive", ...extra });
    const open = renderPrepared(await prepareSky(body({}), "exr", deps));
    const crossed = renderPrepared(await prepareSky(body({ polariserToTangentDeg: 90 }), "exr", deps));
    const brightest = (data: Float32Array) => {
      let best = 0;
      for (let i = 0; i < data.length; i += 3) best = Math.max(best, luminance(data, i));
      return best;
    };
    // The bow is ≥ 80 % tangentially polarised (test/pipeline/compute/profile-bows.test.ts): crossed, its brightest point keeps < 30 %.
    expect(brightest(crossed.data)).toBeLessThan(0.3 * brightest(open.data));
    expect(brightest(crossed.data)).toBeGreaterThan(0);
  });
});

describe("rain curtain", () => {
  it("a texture's alpha is the view's alpha for the same scenario: one curtain, at one wavelength", async () => {
    const view = await prepareView(viewRequestSchema.parse({ scenario, camera: { widthPx: 32, heightPx: 18 } }), "exr", deps);
    const lut = await computeLut(lutRequestSchema.parse({ scenario, sizes: { kind: "none" }, angles: { fromDeg: 38, toDeg: 54, texels: 8 } }), deps);
    expect(view.alpha).toBeGreaterThan(0);
    // The texture stores 32-bit floats.
    expect(lut.rgba[3]).toBe(Math.fround(view.alpha!));
  });
});

describe("files", () => {
  const small = { scenario, camera: { widthPx: 96, heightPx: 54 } };

  it("EXR: the content hash is the string attribute antisolar:hash, the name lookup textures use", async () => {
    const p = await prepareView(viewRequestSchema.parse(small), "exr", deps);
    const body = (await encodeOverlay(p, "exr")).body;
    expect(body.includes(exrStringAttribute("antisolar:hash", p.hash))).toBe(true);
    expect(body.includes(Buffer.from("antisolarHash"))).toBe(false);
  });

  it("EXR: exrheader reads it; half RGBA, ZIP, and the output space's chromaticities", async () => {
    const p = await prepareView(viewRequestSchema.parse({ ...small, output: { space: "acescg" } }), "exr", deps);
    const file = await encodeOverlay(p, "exr");
    const dir = mkdtempSync(join(tmpdir(), "antisolar-view-"));
    try {
      const path = join(dir, "view.exr");
      writeFileSync(path, file.body);
      const result = spawnSync("exrheader", [path], { encoding: "utf8" });
      expect(result.status, result.stderr).toBe(0);
      const header = result.stdout;
      const listed = [...header.matchAll(/^\s+([RGBA]), 16-bit floating-point, sampling 1 1$/gm)].map((m) => m[1]);
      expect(listed).toEqual(["A", "B", "G", "R"]);
      expect(header).toMatch(/^compression \(type compression\): zip, multi-scanline blocks$/m);
      expect(header).toContain("dataWindow (type box2i): (0 0) - (95 53)");
      // Academy S-2014-004 (AP1 primaries) and TB-2018-001 (ACES white).
      const xy = (label: string) => header.match(new RegExp(`^\\s+${label}\\s+\\(([-\\d.e]+) ([-\\d.e]+)\\)$`, "m"))!.slice(1).map(Number);
      expect([...xy("red"), ...xy("green"), ...xy("blue"), ...xy("white")].map((v) => v.toFixed(5))).toEqual(
        [0.713, 0.293, 0.165, 0.83, 0.128, 0.044, 0.32168, 0.33767].map((v) => v.toFixed(5)),
      );
      expect(spawnSync("exrinfo", ["-s", path], { encoding: "utf8" }).status).toBe(0);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("PNG (8-bit sRGB preview) and PNG16 decode with sharp, with alpha and an ICC profile", async () => {
    for (const [format, depth] of [
      ["png", "uchar"],
      ["png16", "ushort"],
    ] as const) {
      const p = await prepareView(viewRequestSchema.parse(small), format, deps);
      const file = await encodeOverlay(p, format);
      expect(file.contentType).toBe("image/png");
      const meta = await sharp(file.body).metadata();
      expect([meta.width, meta.height, meta.channels, meta.depth, meta.hasAlpha]).toEqual([96, 54, 4, depth, true]);
      expect(meta.icc?.length).toBeGreaterThan(100);
    }
  });
});

describe("HTTP", () => {
  let app: FastifyInstance;
  beforeAll(async () => {
    // The same registration http/app.ts does for every RouteSpec.
    app = Fastify();
    for (const route of viewRoutes({ ...loadConfig({}), cacheDir: "" }, kernels)) {
      app.route({
        method: route.method,
        url: route.url,
        handler: async (req, reply) =>
          route.handle({ body: parseOrThrow(route.body!, req.body ?? {}, "body"), query: parseOrThrow(route.query!, req.query ?? {}, "query"), request: req, reply }),
      });
    }
    app.setErrorHandler((error, req, reply) => {
      if (error instanceof ClientError) reply.status(error.status).send(error.toBody(req.id));
      else reply.status(500).send({ error: "internal", message: String(error) });
    });
    await app.ready();
  });
  afterAll(async () => app.close());

  it("POST /v1/view?part=manifest describes the camera, mapping, scale, hash and sources", async () => {
    const res = await request(app.server).post("/v1/view?part=manifest").send({ ...{ scenario }, camera: { widthPx: 64, heightPx: 36 } });
    expect(res.status).toBe(200);
    const m = res.body;
    expect(m.camera).toMatchObject({ projection: "rectilinear", widthPx: 64, heightPx: 36, yawDeg: 60, pitchDeg: 15 });
    expect(m.frame).toMatch(/x east, y north, z up/);
    expect(m.scale.meaning).toMatch(/brightest point of the bows/);
    expect(m.hash).toMatch(/^[0-9a-f]{32}$/);
    expect(m.sources.join(" ")).toMatch(/van de Hulst 1957 §8.22/);
    expect(m.antisolarPoint.elevationDeg).toBeCloseTo(-12, 9);
  });

  it("a curtain with no drops (one empty histogram bin, found by the property tests) is clear, with no ±Infinity in the manifest", async () => {
    const empty = { drops: { kind: "histogram", bins: [{ radiusUm: 1984, numberPerM3: 0 }] }, spectral: { fromNm: 380, toNm: 460, stepNm: 20 } };
    const res = await request(app.server).post("/v1/view?part=manifest").send({ scenario: empty, camera: { widthPx: 4, heightPx: 2 } });
    expect(res.status).toBe(200);
    expect(res.body.layer.curtain).toMatchObject({ opticalDepth: 0, transmittance: 1, qExtRange: [] });
  });

  it("rejects an HDR with alpha, and unknown scenario fields, with 400s naming the field", async () => {
    const hdr = await request(app.server).post("/v1/view?format=hdr").send({ camera: { widthPx: 8, heightPx: 8 } });
    expect(hdr.status).toBe(400);
    expect(hdr.body.field).toBe("layer");
    const typo = await request(app.server).post("/v1/view").send({ scenario: { angles: { fromDeg: 0 } } });
    expect(typo.status).toBe(400);
    expect(typo.body.field).toBe("scenario.angles");
    const sky = await request(app.server).post("/v1/sky").send({ widthPx: 100, heightPx: 100 });
    expect(sky.status).toBe(400);
  });
});
