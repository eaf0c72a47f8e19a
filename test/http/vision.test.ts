import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { chromaSpread } from "../../lib/colour/chroma-spread.js";

let app: FastifyInstance;
beforeAll(async () => {
  // No event-loop guard (0 turns it off): on a loaded machine its first sample can be missing, which
  // @fastify/under-pressure reads as an infinite delay. The guard itself is tested in hardening.test.ts.
  app = await buildApp({ config: { cacheDir: "", workers: 1, maxEventLoopDelayMs: 0 } });
  await app.ready();
});
afterAll(async () => app.close());

const quick = { angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.25 }, spectral: { fromNm: 380, toNm: 780, stepNm: 10 } };
const post = (path: string, body: object) => request(app.server).post(path).send(body);

describe("output.vision", () => {
  it("at daylight levels the eye's result equals the camera's", async () => {
    const camera = await post("/v1/profile", { ...quick, sun: { elevationDeg: 10 } });
    const eye = await post("/v1/profile", { ...quick, sun: { elevationDeg: 10 }, output: { vision: "eye" } });
    expect(eye.status, eye.text).toBe(200);
    expect(eye.body.meta.vision.regime).toMatch(/photopic/);
    expect(eye.body.rgb).toEqual(camera.body.rgb);
    expect(eye.body.luminance).toEqual(camera.body.luminance);
  });

  it("a full-moon bow 10° high: the eye sees under a third of the camera's chroma (scotopic: none)", async () => {
    const body = { ...quick, moon: { elevationDeg: 10, phaseAngleDeg: 0 }, output: { normalise: "physical", space: "xyz-d65" } };
    const camera = await post("/v1/profile", body);
    const eye = await post("/v1/profile", { ...body, output: { ...body.output, vision: "eye" } });
    expect(eye.status).toBe(200);
    const v = eye.body.meta.vision;
    // Level 18 % ground under a full moon 10° high: about 0.002 cd/m², scotopic (CIE 191:2010: below 0.005).
    expect(v.adaptingLuminanceCdPerM2).toBeGreaterThan(0.0005);
    expect(v.adaptingLuminanceCdPerM2).toBeLessThan(0.005);
    expect(chromaSpread(eye.body.xyz) / chromaSpread(camera.body.xyz)).toBeLessThan(1 / 3);
    // Adapted to a brighter, mesopic field (0.01 cd/m², m = 0.145) some colour remains, and the rods' blue shift
    // adds a spread of its own (the Purkinje shift): measured 0.57 of the camera's spread.
    const mesopic = await post("/v1/profile", { ...body, output: { ...body.output, vision: "eye", adaptingLuminanceCdPerM2: 0.01 } });
    expect(mesopic.body.meta.vision.regime).toBe("mesopic");
    const ratio = chromaSpread(mesopic.body.xyz) / chromaSpread(camera.body.xyz);
    expect(ratio).toBeGreaterThan(0.05);
    expect(ratio).toBeLessThan(1);
  });

  it("an adapting luminance can be given; below 0.005 cd/m² the bow has no colour left", async () => {
    const res = await post("/v1/profile", { ...quick, moon: { elevationDeg: 10 }, output: { vision: "eye", adaptingLuminanceCdPerM2: 0.001, space: "xyz-d65" } });
    expect(res.status).toBe(200);
    expect(res.body.meta.vision.regime).toMatch(/scotopic/);
    // The JSON's six significant digits leave a spread of about 1e-6.
    expect(chromaSpread(res.body.xyz)).toBeLessThan(1e-5);
  });

  it("views take the same choice", async () => {
    const res = await post("/v1/view?part=manifest", { camera: { widthPx: 64, heightPx: 36 }, moon: { azimuthDeg: 100, elevationDeg: 10 }, scenario: { spectral: quick.spectral }, output: { vision: "eye" } });
    expect(res.status).toBe(200);
    expect(res.body.profile.vision.mode).toBe("eye");
  });
});
