import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import sharp from "sharp";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { profileRequestSchema } from "../../schemas/profile.js";
import { computeProfile } from "../../pipeline/compute/profile.js";
import { KernelService } from "../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../pipeline/kernels/worker-pool.js";
import { ClientError } from "../../pipeline/requests/client-error.js";
import type { MieSampling } from "../../lib/bow/mie-sub-lattice.js";

let app: FastifyInstance;
beforeAll(async () => {
  app = await buildApp({ config: { cacheDir: "" } });
  await app.ready();
});
afterAll(async () => app.close());

// A cheap scenario for the HTTP checks: the physics itself is tested in test/pipeline/compute/profile-bows.test.ts.
const quick = { angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.25 }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };

function pngBuffer(res: request.Response): Buffer {
  return res.body as Buffer;
}

async function pngRequest(path: string, body: object, accept?: string) {
  let req = request(app.server).post(path).buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on("data", (c: Buffer) => chunks.push(c));
    res.on("end", () => cb(null, Buffer.concat(chunks)));
  });
  if (accept) req = req.set("accept", accept);
  return req.send(body);
}

describe("POST /v1/profile", () => {
  it("{} renders a shower bow as JSON with every documented field", async () => {
    const res = await request(app.server).post("/v1/profile").send(quick);
    expect(res.status).toBe(200);
    const b = res.body;
    const n = b.anglesDeg.length;
    expect(n).toBe(81);
    for (const key of ["xyz", "chromaticity", "luminance", "rgb", "outOfGamut", "polarisation"]) expect(b[key]).toHaveLength(n);
    expect(b.bows.primaryDeg).toBeGreaterThan(40);
    expect(Math.max(...b.luminance)).toBeCloseTo(1, 6);
    expect(b.meta).toMatchObject({ normalisation: "peak", cache: "miss" });
    expect(b.meta.method.engines.length).toBeGreaterThan(0);
    expect(b.meta.hash).toMatch(/^[0-9a-f]{32}$/);
    expect(b.meta.sources.join(" ")).toMatch(/IAPWS/);
    expect(typeof b.meta.computeMs).toBe("number");
  });

  it("the PNG strip decodes (sharp) back to the JSON colours within one code value, 8 and 16 bit", async () => {
    const json = (await request(app.server).post("/v1/profile").send(quick)).body;
    for (const [query, bits] of [
      ["?format=png&height=4", 8],
      ["?format=png16&height=4", 16],
    ] as const) {
      const res = await pngRequest(`/v1/profile${query}`, quick);
      expect(res.status).toBe(200);
      expect(res.headers["content-type"]).toBe("image/png");
      const img = sharp(pngBuffer(res)).keepIccProfile();
      const decoded = bits === 16 ? img.toColourspace("rgb16").raw({ depth: "ushort" }) : img.raw();
      const { data, info } = await decoded.toBuffer({ resolveWithObject: true });
      expect(info.width).toBe(json.anglesDeg.length);
      expect(info.height).toBe(4);
      const codes = bits === 16 ? new Uint16Array(data.buffer, data.byteOffset, data.length / 2) : data;
      const max = 2 ** bits - 1;
      let worst = 0;
      for (let i = 0; i < json.rgb.length; i++) {
        for (let c = 0; c < 3; c++) {
          const expected = Math.min(1, Math.max(0, json.rgb[i][c])) * max;
          worst = Math.max(worst, Math.abs(codes[3 * i + c] - expected));
        }
      }
      expect(worst).toBeLessThanOrEqual(1);
    }
  });

  it("Accept: image/png gives the strip; ?format wins over Accept", async () => {
    const png = await pngRequest("/v1/profile", quick, "image/png");
    expect(png.headers["content-type"]).toBe("image/png");
    const json = await request(app.server).post("/v1/profile?format=json").set("accept", "image/png").send(quick);
    expect(json.headers["content-type"]).toMatch(/application\/json/);
  });

  it("400s name the field and the allowed range", async () => {
    const res = await request(app.server).post("/v1/profile").send({ drops: { kind: "marshall-palmer", rainRateMmPerH: 900 } });
    expect(res.status).toBe(400);
    expect(res.body.field).toBe("drops.rainRateMmPerH");
    expect(res.body.allowed).toMatch(/150/);
    const kind = await request(app.server).post("/v1/profile").send({ drops: { kind: "snow" } });
    expect(kind.status).toBe(400);
    expect(kind.body.message).toMatch(/marshall-palmer/);
    const bits = await request(app.server).post("/v1/profile?bitDepth=12").send({});
    expect(bits.status).toBe(400);
    expect(bits.body.field).toBe("bitDepth");
  });

  it("a sun whose light the atmosphere stops entirely gives a black bow and a warning, not an error", async () => {
    // Air mass ≈ 38 at the horizon (Kasten & Young 1989) with Ångström β = 0.9, α = 4 at 380–460 nm: τ·m ≫ 700,
    // so the transmitted sunlight underflows to zero.
    const scenario = {
      sun: { elevationDeg: 0, atmosphere: { angstromBeta: 0.9, angstromAlpha: 4 } },
      spectral: { fromNm: 380, toNm: 460, stepNm: 20 },
      drops: { kind: "monodisperse", radiusUm: 20 },
    };
    const res = await request(app.server).post("/v1/profile").send({ ...scenario, angles: { fromDeg: 36, toDeg: 46, stepDeg: 0.5 } });
    expect(res.status).toBe(200);
    expect(res.body.meta.warnings.join(" ")).toMatch(/no direct sunlight/);
    expect(Math.max(...res.body.luminance)).toBe(0);
    // The sky map takes the sun's elevation from its own field, and found the same failure through the property tests.
    const skyScenario = { spectral: scenario.spectral, drops: scenario.drops, sun: { atmosphere: scenario.sun.atmosphere } };
    const sky = await request(app.server).post("/v1/sky?part=manifest").send({ scenario: skyScenario, sun: { azimuthDeg: 0, elevationDeg: 0 }, widthPx: 2, heightPx: 1 });
    expect(sky.status).toBe(200);
  });

  it("a subnormal drop count (found by the property tests) gives finite colours and a finite scale factor (0), not Infinity", async () => {
    // 5.5e-314 drops per m³: the peak luminance is a subnormal double and 1/peak overflows (IEEE 754 binary64).
    const scenario = { drops: { kind: "monodisperse", radiusUm: 5, numberPerM3: 5.492806807e-314 }, spectral: { fromNm: 380, toNm: 460, stepNm: 20 }, method: "geometric" };
    const profile = await request(app.server).post("/v1/profile").send({ ...scenario, angles: { fromDeg: 38, toDeg: 44, stepDeg: 1 }, output: { normalise: "peak" } });
    expect(profile.status).toBe(200);
    for (const v of [...profile.body.luminance, ...profile.body.xyz.flat(), ...profile.body.rgb.flat()]) expect(Number.isFinite(v)).toBe(true);
    const sky = await request(app.server).post("/v1/sky?part=manifest").send({ scenario, sun: { azimuthDeg: 0, elevationDeg: 10 }, widthPx: 2, heightPx: 1 });
    expect(sky.status).toBe(200);
    expect(sky.body.scale.factor).toBe(0);
  });

  it("422 for a full-Mie rain profile over the synchronous budget", async () => {
    const res = await request(app.server).post("/v1/profile").send({ method: "mie" });
    expect(res.status).toBe(422);
    expect(res.body.error).toBe("too-costly");
    expect(res.body.message).toMatch(/auto/);
    expect(res.body.message).toMatch(/POST \/v1\/jobs/);
  });

  it("the cost guard's estimate is the Mie work a cold profile does at every lattice point (within 1 %), and bounds the sub-lattice's", async () => {
    // Fog (all drops below the Airy radius) over a 6° window: the kernel computes only the window's lattice points,
    // and the guard must count those, not whole 5° blocks, or it refuses requests it could serve; each Mie row is
    // the mean of 4 sizes (256 per decade over 64 nodes), which the guard must count too. The density is fixed
    // here because "auto" chooses it within the limit, and the refused run's limit is 1. The guard counts every
    // lattice point (lib/bow/engine-choice.ts estimateMieTermAngles); these small drops' rows are computed on a
    // sub-lattice (lib/bow/mie-sub-lattice.ts), which spends less.
    const body = profileRequestSchema.parse({ drops: { kind: "lognormal", medianRadiusUm: 8, geometricSd: 1.3, totalNumberPerM3: 1e8 }, angles: { fromDeg: 31, toDeg: 37, stepDeg: 0.1 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 }, mieSizesPerDecade: 256 });
    const fresh = (mieSampling: MieSampling) => new KernelService({ memoryBudgetBytes: 2 ** 28, compute: createInlinePool().compute, mieSampling });
    const refused = await computeProfile(body, { kernels: fresh("adaptive"), limits: { maxTermAngles: 1 } }).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(ClientError);
    const estimate = (refused as ClientError).details.cost as number;
    const done = await computeProfile(body, { kernels: fresh("lattice"), limits: { maxTermAngles: Infinity } });
    expect(done.spectral.mieTermAngles).toBeGreaterThan(0);
    expect(Math.abs(estimate / done.spectral.mieTermAngles - 1)).toBeLessThan(0.01);
    const sub = await computeProfile(body, { kernels: fresh("adaptive"), limits: { maxTermAngles: Infinity } });
    expect(sub.spectral.mieTermAngles).toBeGreaterThan(0);
    expect(sub.spectral.mieTermAngles).toBeLessThan(estimate);
  });
});

describe("presets", () => {
  it("lists the demo scenarios and serves each as a complete, valid body that renders", async () => {
    const list = await request(app.server).get("/v1/presets");
    expect(list.status).toBe(200);
    const names = list.body.presets.map((p: { name: string }) => p.name);
    expect(names).toEqual(expect.arrayContaining(["evening-shower", "heavy-downpour", "drizzle", "sea-spray", "fog-bank", "garden-sprinkler"]));
    for (const name of names) {
      const one = await request(app.server).get(`/v1/presets/${name}`);
      expect(one.status).toBe(200);
      for (const key of ["drops", "water", "sun", "observer", "angles", "spectral", "method", "output"]) expect(one.body.body).toHaveProperty(key);
    }
    // One preset end to end, on a coarser wavelength grid to keep the suite quick.
    const sea = (await request(app.server).get("/v1/presets/sea-spray")).body.body;
    const res = await request(app.server).post("/v1/profile").send({ ...sea, spectral: { fromNm: 400, toNm: 700, stepNm: 20 } });
    expect(res.status).toBe(200);
    expect(res.body.bows.primaryDeg).toBeGreaterThan(38);
  });

  it("404 for an unknown preset lists the known ones", async () => {
    const res = await request(app.server).get("/v1/presets/monsoon");
    expect(res.status).toBe(404);
    expect(res.body.allowed).toMatch(/fog-bank/);
  });
});
