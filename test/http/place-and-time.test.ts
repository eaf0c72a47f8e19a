import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";

let app: FastifyInstance;
beforeAll(async () => {
  // No event-loop guard (0 turns it off): on a loaded machine its first sample can be missing, which
  // @fastify/under-pressure reads as an infinite delay. The guard itself is tested in hardening.test.ts.
  app = await buildApp({ config: { cacheDir: "", workers: 1, maxEventLoopDelayMs: 0 } });
  await app.ready();
});
afterAll(async () => app.close());

const quick = { angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.5 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 } };
// The NREL SPA worked example's place and moment (Reda & Andreas 2004, NREL/TP-560-34302, Table A5.1): the sun
// stands at an apparent elevation of 90° − 50.11162° = 39.88838°, azimuth 194.34024°.
const spaPlace = { latitudeDeg: 39.742476, longitudeDeg: -105.1786, heightM: 1830.14, pressureHpa: 820, temperatureC: 11 };
const spaMoment = { utc: "2003-10-17T12:30:30-07:00", ...spaPlace };
// Local midnight at the same place: the sun is far below the horizon.
const midnight = { utc: "2003-10-17T07:00:00Z", ...spaPlace };

const post = (path: string, body: object) => request(app.server).post(path).send(body);

describe("sun.at: a moment and a place instead of the sun's angles", () => {
  it("profile: meta.sourcePosition states the SPA example's position (within 0.03°), and the profile equals the one for those angles", async () => {
    const res = await post("/v1/profile", { ...quick, sun: { at: spaMoment } });
    expect(res.status, res.text).toBe(200);
    const p = res.body.meta.sourcePosition;
    expect(Math.abs(p.elevationDeg - (90 - 50.11162))).toBeLessThan(0.03);
    expect(Math.abs(p.azimuthDeg - 194.34024)).toBeLessThan(0.03);
    expect(p.refractionModel).toMatch(/Saemundsson/);
    expect(p.source).toBe("sun");
    const plain = await post("/v1/profile", { ...quick, sun: { elevationDeg: p.elevationDeg } });
    expect(plain.status).toBe(200);
    // meta.sourcePosition is rounded to 1e-6°: the luminance at six significant digits is unchanged by that.
    expect(res.body.luminance).toEqual(plain.body.luminance);
  });

  it("a moment with the sun below the horizon is a 422 naming the field", async () => {
    const res = await post("/v1/profile", { ...quick, sun: { at: midnight } });
    expect(res.status).toBe(422);
    expect(res.body.error).toBe("source-below-horizon");
    expect(res.body.field).toBe("sun.at.utc");
    expect(res.body.message).toMatch(/below the horizon/);
    expect(res.body.elevationDeg).toBeLessThan(0);
  });

  it("belowHorizon black: a black profile with a warning", async () => {
    const res = await post("/v1/profile", { ...quick, sun: { at: { ...midnight, belowHorizon: "black" } }, output: { normalise: "physical", space: "srgb-linear" } });
    expect(res.status).toBe(200);
    expect(res.body.meta.sourcePosition.belowHorizon).toBe(true);
    expect(res.body.meta.warnings[0]).toMatch(/below the horizon/);
    expect(res.body.luminance.every((v: number) => v === 0)).toBe(true);
    expect(res.body.rgb.flat().every((v: number) => v === 0)).toBe(true);
    // Peak normalisation of nothing stays nothing (no NaN, which JSON would carry as null).
    const peak = await post("/v1/profile", { ...quick, sun: { at: { ...midnight, belowHorizon: "black" } } });
    expect(peak.status).toBe(200);
    expect(peak.body.luminance.every((v: number) => v === 0)).toBe(true);
    const sky = await post("/v1/sky?part=manifest", { widthPx: 64, heightPx: 32, sun: { at: { ...midnight, belowHorizon: "black" } }, scenario: { spectral: quick.spectral } });
    expect(sky.status).toBe(200);
    expect(sky.body.warnings[0]).toMatch(/black/);
  });

  it("view and sky: the manifest carries sourcePosition and the camera faces the computed antisolar azimuth", async () => {
    const view = await post("/v1/view?part=manifest", { camera: { widthPx: 64, heightPx: 36 }, sun: { at: spaMoment }, scenario: quick.spectral ? { spectral: quick.spectral } : {} });
    expect(view.status).toBe(200);
    expect(Math.abs(view.body.sourcePosition.azimuthDeg - 194.34024)).toBeLessThan(0.03);
    expect(view.body.camera.yawDeg).toBeCloseTo(194.34024 - 180, 1);
    const sky = await post("/v1/sky", { widthPx: 64, heightPx: 32, sun: { at: spaMoment }, scenario: { spectral: quick.spectral } });
    expect(sky.status).toBe(200);
    expect(JSON.parse(sky.headers["x-antisolar-source-position"]).elevationDeg).toBeCloseTo(90 - 50.11162, 1);
  });

  it("lookup texture: scenario.sun.at is resolved and stated in the manifest", async () => {
    const res = await post("/v1/lut?part=manifest", { scenario: { sun: { at: spaMoment }, spectral: quick.spectral }, sizes: { kind: "none" }, angles: { texels: 16 } });
    expect(res.status).toBe(200);
    expect(res.body.sourcePosition.elevationDeg).toBeCloseTo(90 - 50.11162, 1);
  });

  it("bad moments and places are 400s naming the field and the range", async () => {
    const bad = [
      [{ ...spaMoment, utc: "17 October 2003" }, "sun.at.utc"],
      [{ ...spaMoment, utc: "1850-01-01T00:00:00Z" }, "sun.at.utc"],
      [{ ...spaMoment, latitudeDeg: 91 }, "sun.at.latitudeDeg"],
      [{ ...spaMoment, longitudeDeg: -181 }, "sun.at.longitudeDeg"],
    ] as const;
    for (const [at, field] of bad) {
      const res = await post("/v1/profile", { ...quick, sun: { at } });
      expect(res.status, field).toBe(400);
      expect(res.body.field).toBe(field);
    }
  });

  it("the OpenAPI document's example bodies (invented places) render, and /docs shows them", async () => {
    const doc = (await request(app.server).get("/openapi.json")).body;
    for (const path of ["/v1/profile", "/v1/view"]) {
      const examples = doc.paths[path].post.requestBody.content["application/json"].examples as Record<string, { value: object }>;
      expect(Object.keys(examples).length, path).toBeGreaterThanOrEqual(2);
      for (const [name, example] of Object.entries(examples)) {
        const small = path === "/v1/view" ? { ...example.value, camera: { widthPx: 32, heightPx: 18 } } : { ...example.value, ...quick };
        const res = await post(`${path}${path === "/v1/view" ? "?part=manifest" : ""}`, small);
        expect(res.status, `${path} ${name}: ${res.text.slice(0, 200)}`).toBe(200);
      }
    }
    expect((await request(app.server).get("/docs")).text).toContain("invented valley town");
  });
});
