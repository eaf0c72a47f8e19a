import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";

let app: FastifyInstance;
beforeAll(async () => {
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 1, maxEventLoopDelayMs: 600_000, maxRssMb: 1_000_000 } });
  await app.ready();
});
afterAll(async () => app.close());

const sky = {
  scenario: { drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 } },
  sun: { azimuthDeg: 180, elevationDeg: 8 },
  widthPx: 64,
  heightPx: 32,
};

// Cox & Munk (1954) measured the sea's slopes for winds of about 1–14 m/s: outside that their fit is not a measurement.
describe("POST /v1/sky: rough water outside Cox & Munk's wind speeds is a 400 naming waterSurface.windSpeedMs", () => {
  it.each([
    [{ kind: "rough", windSpeedMs: 0.5 }, /1/],
    [{ kind: "rough", windSpeedMs: 20 }, /14/],
    [{ kind: "rough" }, /windSpeedMs|number/],
  ])("%j → 400", async (waterSurface, allowed) => {
    const res = await app.inject({ method: "POST", url: "/v1/sky", payload: { ...sky, waterSurface } });
    expect(res.statusCode).toBe(400);
    const body = res.json();
    expect(body.field).toBe("waterSurface.windSpeedMs");
    expect(`${body.allowed ?? ""} ${body.message}`).toMatch(allowed);
  });
});
