import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";

let app: FastifyInstance;
beforeAll(async () => {
  // Validation is what is tested: a loaded test machine must not turn it into 503s.
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 1, maxEventLoopDelayMs: 600_000, maxRssMb: 1_000_000 } });
  await app.ready();
});
afterAll(async () => app.close());

/** POST, retrying a 503 "overloaded" as a client would (a loaded test machine trips the event-loop guard). */
async function post(url: string, payload: object): Promise<{ status: number; body: Record<string, string> }> {
  for (let attempt = 0; ; attempt++) {
    const res = await app.inject({ method: "POST", url, payload });
    if (res.statusCode !== 503 || attempt === 10) return { status: res.statusCode, body: res.json() };
    await new Promise((resolve) => setTimeout(resolve, 1000));
  }
}

describe("POST /v1/profile: drop shapes and arc positions outside what the service serves are 400s naming the field and range", () => {
  it.each([
    [{ drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "spheroid", axisRatio: 0.3 } } }, "drops.shape.axisRatio", /0\.6/],
    [{ drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium", cantingSdDeg: 45 } } }, "drops.shape.cantingSdDeg", /20/],
    [{ arcPositionDeg: 200 }, "arcPositionDeg", /180/],
    [{ arcPositionDeg: -1 }, "arcPositionDeg", /0/],
    [{ drops: { kind: "marshall-palmer", rainRateMmPerH: 5, shape: { kind: "cube" } } }, "drops.shape.kind", /equilibrium/],
  ])("%j → 400 on %s", async (body, field, allowed) => {
    const res = await post("/v1/profile", body);
    expect(res.status).toBe(400);
    expect(res.body.field).toBe(field);
    expect(`${res.body.allowed ?? ""} ${res.body.message}`).toMatch(allowed);
  });

  it("a flattened shape with method mie is an unsupported combination: 400 on drops.shape", async () => {
    const res = await post("/v1/profile", { method: "mie", drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium" } } });
    expect(res.status).toBe(400);
    expect(res.body.field).toBe("drops.shape");
    expect(res.body.message).toMatch(/auto/);
  });
});

describe("flattened drops where they are not served: a 400 naming the field", () => {
  it.each([
    ["/v1/view", { scenario: { drops: { kind: "marshall-palmer", rainRateMmPerH: 5, shape: { kind: "equilibrium" } } }, waterSurface: { kind: "calm" } }, "waterSurface", /sphere/],
    ["/v1/sky", { scenario: { drops: { kind: "marshall-palmer", rainRateMmPerH: 5, shape: { kind: "equilibrium" } } }, waterSurface: { kind: "calm" } }, "waterSurface", /sphere/],
    ["/v1/lut", { scenario: { drops: { kind: "marshall-palmer", rainRateMmPerH: 5, shape: { kind: "spheroid", axisRatio: 0.8 } } }, sunElevations: { fromDeg: 0, toDeg: 20, slices: 3 } }, "sunElevations", /one slice axis/],
    ["/v1/lut", { arcPositions: { fromDeg: 0, toDeg: 90, slices: 3 } }, "arcPositions", /flattened drops/],
    ["/v1/lut?layers=by-order", { scenario: { drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium" } } } }, "layers", /spherical drops/],
    ["/v1/lut", { scenario: { drops: { kind: "marshall-palmer", rainRateMmPerH: 5, shape: { kind: "equilibrium" } } }, angles: { texels: 4096 } }, "arcPositions.slices", /texels/],
  ])("%s", async (path, body, field, message) => {
    const res = await post(path, body);
    expect(res.status).toBe(400);
    expect(res.body.field).toBe(field);
    expect(res.body.message).toMatch(message);
  });
});

describe("flattened drops over the synchronous budget", () => {
  it("a full-spectrum flattened profile is a 422 too-costly that points to /v1/jobs", async () => {
    const res = await post("/v1/profile", { drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium" } } });
    expect(res.status).toBe(422);
    expect(res.body.error).toBe("too-costly");
    expect(res.body.message).toMatch(/\/v1\/jobs/);
  });

  it("so is a camera view of flattened drops over the full spectrum: its profiles along the arc are counted together", async () => {
    const res = await post("/v1/view", { scenario: { drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium" } } } });
    expect(res.status).toBe(422);
    expect(res.body.error).toBe("too-costly");
    expect(res.body.message).toMatch(/profiles along the arc/);
    expect(res.body.message).toMatch(/\/v1\/jobs/);
  });
});
