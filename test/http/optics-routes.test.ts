import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";

let app: FastifyInstance;
beforeAll(async () => {
  app = await buildApp();
  await app.ready();
});
afterAll(async () => app.close());

const post = (body: unknown) => request(app.server).post("/v1/scatter").send(body as object);

describe("POST /v1/scatter", () => {
  it("reproduces Wiscombe's MIEV0 case 10 (m = 1.33 + 1e-5 i, x = 100) through HTTP", async () => {
    // Wiscombe 1979 (NCAR/TN-140+STR, MIEV0 test-case answers) case 10: Qext 2.101321, Qsca 2.096594; at 90°
    // S1 = −3.655758 + 8.769860i and S2 = −6.550512 − 4.675370i. x = 100 at λ = 2π µm and r = 100 µm.
    const res = await post({
      radiusUm: 100,
      wavelengthNm: 2000 * Math.PI,
      refractiveIndex: { re: 1.33, im: 1e-5 },
      scatteringAngles: { fromDeg: 0, toDeg: 180, stepDeg: 90 },
    });
    expect(res.status).toBe(200);
    expect(res.body.sizeParameter).toBeCloseTo(100, 10);
    // 1e-6 relative: the published values carry 7 digits.
    expect(Math.abs(res.body.qExt / 2.101321 - 1)).toBeLessThan(1e-6);
    expect(Math.abs(res.body.qSca / 2.096594 - 1)).toBeLessThan(1e-6);
    const s1At90 = 3.655758 ** 2 + 8.76986 ** 2;
    expect(Math.abs(res.body.intensityPerpendicular[1] / s1At90 - 1)).toBeLessThan(5e-6);
    const s2At90 = 6.550512 ** 2 + 4.67537 ** 2;
    expect(Math.abs(res.body.intensityParallel[1] / s2At90 - 1)).toBeLessThan(5e-6);
    // |S1|², |S2|² are van de Hulst's i1, i2, not the Mueller element S11 = ½(i1 + i2): no field is named after it.
    expect(Object.keys(res.body).filter((k) => /s11/i.test(k))).toEqual([]);
    expect(res.body.scatteringAngleDeg).toEqual([0, 90, 180]);
    expect(res.body.meta.method).toBe("mie");
  });

  it("uses water's index relative to air and the wavelength in air by default", async () => {
    const res = await post({ radiusUm: 10, wavelengthNm: 589.3, scatteringAngles: { fromDeg: 0, toDeg: 180, stepDeg: 45 } });
    expect(res.status).toBe(200);
    // IAPWS R9-97 at 20 °C, 589.3 nm, ρ = 998.20715 kg/m³ (IAPWS-95): n = 1.333349 (computed from the release's formula,
    // docs/checks.md), divided by n_air ≈ 1.000277 (Ciddor 1996).
    expect(res.body.refractiveIndex.re).toBeCloseTo(1.333349 / 1.000277, 5);
    expect(res.body.sizeParameter).toBeCloseTo((2 * Math.PI * 10_000 * 1.000277) / 589.3, 2);
  });

  it("Debye orders: the p = 2 term of a 1 mm drop peaks at the primary bow", async () => {
    const res = await post({
      radiusUm: 100,
      wavelengthNm: 600,
      method: "debye",
      debyeOrder: 2,
      scatteringAngles: { fromDeg: 130, toDeg: 145, stepDeg: 0.05 },
    });
    expect(res.status).toBe(200);
    const s = res.body.intensityPerpendicular as number[];
    const peak = res.body.scatteringAngleDeg[s.indexOf(Math.max(...s))];
    // Descartes primary for water at 600 nm: ψ = 42.075° (Descartes' condition, van de Hulst 1957 ch. 13, with
    // R9-97's n; docs/checks.md), Θ = 137.925°; Airy's main maximum for x ≈ 1050 lies ≈ 0.9° towards larger Θ
    // (1.01879·(D″/2)^(1/3)·x^(−2/3), Airy 1838; van de Hulst 1957 ch. 13): peak expected near 138.8°.
    expect(peak).toBeGreaterThan(138.3);
    expect(peak).toBeLessThan(139.3);
  });

  it("Airy and geometric methods answer with finite numbers or null at caustics", async () => {
    for (const method of ["airy", "geometric"]) {
      const res = await post({ radiusUm: 500, wavelengthNm: 550, method, scatteringAngles: { fromDeg: 120, toDeg: 150, stepDeg: 0.5 } });
      expect(res.status).toBe(200);
      for (const v of res.body.intensityPerpendicular) expect(v === null || Number.isFinite(v)).toBe(true);
    }
  });

  it("refuses a request over the synchronous budget with 422 naming cost and limit", async () => {
    const res = await post({ radiusUm: 3000, wavelengthNm: 380, scatteringAngles: { fromDeg: 0, toDeg: 180, stepDeg: 0.001 } });
    expect(res.status).toBe(422);
    expect(res.body.error).toBe("too-costly");
    expect(res.body.limit).toBe(200_000_000);
    expect(res.body.cost).toBeGreaterThan(res.body.limit);
  });

  it("admits x ≈ 50,000 over 3,001 angles (the issue's minimum budget) by cost", async () => {
    // Only the cost check is exercised here; the compute itself is timed by npm run bench.
    const { scatterCost } = await import("../../pipeline/compute/scatter.js");
    const { scatterRequestSchema } = await import("../../schemas/scatter.js");
    const cost = scatterCost(
      scatterRequestSchema.parse({ radiusUm: 3000, wavelengthNm: 380, scatteringAngles: { fromDeg: 120, toDeg: 150, stepDeg: 0.01 } }),
    );
    expect(cost.angles).toBe(3001);
    expect(cost.termAngles).toBeGreaterThan(1.45e8);
    expect(cost.termAngles).toBeLessThan(200_000_000);
  });

  it.each([
    [{ radiusUm: -1 }, "radiusUm", /0.001/],
    [{ wavelengthNm: 1500 }, "wavelengthNm", /1100/],
    [{ scatteringAngles: { fromDeg: 10, toDeg: 5, stepDeg: 1 } }, "scatteringAngles.toDeg", /fromDeg/],
    [{ method: "rays" }, "method", /mie/],
    [{ radiusUm: 10, colour: "red" }, "colour", /radiusUm/],
    [{ refractiveIndex: { re: 1.5 }, water: { temperatureC: 10 } }, "water", /either/],
    [{ debyeOrder: 3 }, "debyeOrder", /debye/],
  ])("400 for %j names the field %s and what is allowed", async (body, field, allowed) => {
    const res = await post(body);
    expect(res.status).toBe(400);
    expect(res.body.error).toBe("invalid-request");
    expect(res.body.field).toBe(field);
    expect(`${res.body.message} ${res.body.allowed ?? ""}`).toMatch(allowed);
  });

  it("400 for malformed JSON and 415 for a non-JSON body", async () => {
    const bad = await request(app.server).post("/v1/scatter").set("content-type", "application/json").send("{radius");
    expect(bad.status).toBe(400);
    expect(bad.body.error).toBe("invalid-json");
    const text = await request(app.server).post("/v1/scatter").set("content-type", "text/plain").send("radius=1");
    expect(text.status).toBe(415);
  });
});

describe("GET /v1/water", () => {
  it("gives IAPWS R9-97 at 20 °C and 589.3 nm with the index relative to air", async () => {
    const res = await request(app.server).get("/v1/water?wavelengthNm=589.3&temperatureC=20");
    expect(res.status).toBe(200);
    // R9-97 at ρ = 998.20715 kg/m³ (IAPWS-95 at 20 °C): 1.333349 (computed, docs/checks.md); our Kell density gives ≤ 2e-6 off.
    expect(Math.abs(res.body.n - 1.333349)).toBeLessThan(2e-6);
    expect(res.body.nRelativeToAir).toBeLessThan(res.body.n);
    expect(res.body.wavelength).toBe("vacuum");
  });

  it("400 names the wavelength range for salt water", async () => {
    const res = await request(app.server).get("/v1/water?wavelengthNm=380&salinityPsu=35");
    expect(res.status).toBe(400);
    expect(res.body.field).toBe("wavelengthNm");
    expect(res.body.message).toMatch(/400 to 700/);
  });
});
