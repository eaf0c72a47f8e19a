import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { sourcePosition } from "../../lib/sky/source-position.js";

let app: FastifyInstance;
beforeAll(async () => {
  // No event-loop guard (0 turns it off): on a loaded machine its first sample can be missing, which
  // @fastify/under-pressure reads as an infinite delay. The guard itself is tested in hardening.test.ts.
  app = await buildApp({ config: { cacheDir: "", workers: 1, maxEventLoopDelayMs: 0 } });
  await app.ready();
});
afterAll(async () => app.close());

const quick = { angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.5 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 } };
const physical = { space: "srgb-linear", normalise: "physical", white: "absolute" };
const post = (path: string, body: object) => request(app.server).post(path).send(body);

// An invented place at 46.5° N, 7.9° E; the first hour of 2026-03-03 (full moon at 11:38 UTC by astronomy-engine's
// SearchMoonPhase) at which the moon stands over 20° high (measured: 00:00 UTC, 51.2° high, phase angle 6.0°).
const place = { latitudeDeg: 46.5, longitudeDeg: 7.9 };
function moonUpAt(): string {
  for (let h = 0; h < 48; h++) {
    const utcMs = Date.UTC(2026, 2, 3, h);
    if (sourcePosition("moon", { utcMs, ...place }).elevationDeg > 20) return new Date(utcMs).toISOString();
  }
  throw new Error("no moonrise in two days");
}

describe("the moon as the light", () => {
  it("full moon: the moonbow's luminance is 2–3 × 10⁻⁶ of the sunbow's for the same geometry, in cd/m²", async () => {
    // Krisciunas & Schaefer 1991: 0.313 lx at full moon against about 1.3e5 lx of sunlight above the atmosphere
    // (ASTM G173-03 extraterrestrial) gives 2.4e-6; the moonlight is redder and its disc slightly smaller.
    // Measured: 2.37e-6 (peak 3.7e-3 cd/m² for 2 mm/h rain over 1000 m).
    const sun = await post("/v1/profile", { ...quick, sun: { elevationDeg: 10 }, output: physical });
    const moon = await post("/v1/profile", { ...quick, moon: { elevationDeg: 10, phaseAngleDeg: 0 }, output: physical });
    expect(sun.status).toBe(200);
    expect(moon.status).toBe(200);
    expect(moon.body.meta.units.luminance).toBe("cd/m²");
    const ratio = moon.body.meta.peakLuminanceCdPerM2 / sun.body.meta.peakLuminanceCdPerM2;
    expect(ratio).toBeGreaterThan(2e-6);
    expect(ratio).toBeLessThan(3e-6);
    expect(moon.body.meta.moonlight.illuminanceLux).toBeCloseTo(0.313, 3);
    expect(moon.body.meta.moonlight.discDeg).toBeCloseTo(0.518, 3);
    expect(moon.body.meta.sources.join(" ")).toMatch(/Krisciunas/);
  });

  it("moon.at: position, phase and distance come from the moment and the place", async () => {
    const utc = moonUpAt();
    const res = await post("/v1/profile", { ...quick, moon: { at: { utc, ...place } } });
    expect(res.status).toBe(200);
    const p = res.body.meta.sourcePosition;
    expect(p.source).toBe("moon");
    expect(p.elevationDeg).toBeGreaterThan(20);
    expect(res.body.meta.moonlight.phaseAngleDeg).toBeLessThan(15);
    expect(res.body.meta.moonlight.distanceKm).toBe(p.distanceKm);
  });

  it("a moon below the horizon is a 422 naming moon.at.utc; sun and moon together are a 400", async () => {
    // Midday at the invented place on the day of a full moon: the full moon is down.
    const below = await post("/v1/profile", { ...quick, moon: { at: { utc: "2026-03-03T11:00:00Z", ...place } } });
    expect(below.status).toBe(422);
    expect(below.body.field).toBe("moon.at.utc");
    const both = await post("/v1/profile", { ...quick, sun: { elevationDeg: 20 }, moon: {} });
    expect(both.status).toBe(400);
    expect(both.body.field).toBe("sun");
  });

  it("views, sky maps and textures take the moon too", async () => {
    const view = await post("/v1/view?part=manifest", { camera: { widthPx: 64, heightPx: 36 }, moon: { azimuthDeg: 120, elevationDeg: 15 }, scenario: { spectral: quick.spectral } });
    expect(view.status).toBe(200);
    expect(view.body.moonlight.phaseAngleDeg).toBe(0);
    expect(view.body.camera.yawDeg).toBeCloseTo(300, 6);
    const sky = await post("/v1/sky", { widthPx: 64, heightPx: 32, moon: { at: { utc: moonUpAt(), ...place } }, scenario: { spectral: quick.spectral } });
    expect(sky.status).toBe(200);
    expect(JSON.parse(sky.headers["x-antisolar-source-position"]).source).toBe("moon");
    const lut = await post("/v1/lut?part=manifest", { scenario: { moon: { phaseAngleDeg: 30 }, spectral: quick.spectral }, sizes: { kind: "none" }, angles: { texels: 16 } });
    expect(lut.status).toBe(200);
    expect(lut.body.moonlight.illuminanceLux).toBeLessThan(0.2);
  });
});
