// A camera view of flattened drops over the synchronous limit: POST /v1/view answers 422 pointing to /v1/jobs, and
// the job route serves the same view (its manifest names the arc positions the pixels blend between). The physics is
// checked in test/pipeline/compute/flattened-view.test.ts; here the routes around it.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { AddressInfo } from "node:net";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { directionFromAzimuthElevation, azimuthElevationOf } from "../../lib/view/vectors.js";

let app: FastifyInstance;
let base: string;

beforeAll(async () => {
  // A low synchronous limit (2e8 term-angles): even this small view of flattened drops is refused synchronously (its
  // traced planes are priced at 2.4e5 term-angles a bin: pipeline/compute/drop-shape-plan.ts).
  const config = { cacheDir: "", rateLimitPerMinute: 0, maxEventLoopDelayMs: 0, workers: 1, redisUrl: "", jobsInProcess: false, jobConcurrency: 1, jobMaxTermAngles: Infinity, maxProfileTermAngles: 2e8 };
  app = await buildApp({ config: config as never });
  await app.listen({ port: 0, host: "127.0.0.1" });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});
afterAll(async () => app?.close());

// A 9 × 9 camera on the top of the bow (sun 10° up at azimuth 240°): arc positions 0°–5°, two profiles of one
// drop size, two wavelengths, no canting.
const top = azimuthElevationOf(directionFromAzimuthElevation(60, 32));
const view = {
  scenario: { drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } }, spectral: { fromNm: 540, toNm: 560, stepNm: 20 } },
  sun: { azimuthDeg: 240, elevationDeg: 10 },
  camera: { yawDeg: top.azimuthDeg, pitchDeg: top.elevationDeg, widthPx: 9, heightPx: 9, horizontalFovDeg: 4 },
};

describe("a flattened-drop view beyond the synchronous limit", () => {
  it("is a 422 too-costly pointing to /v1/jobs, and the job serves it", { timeout: 600_000 }, async () => {
    const sync = await fetch(`${base}/v1/view?part=manifest`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(view) });
    expect(sync.status).toBe(422);
    const refusal = (await sync.json()) as { error: string; message: string };
    expect(refusal.error).toBe("too-costly");
    expect(refusal.message).toMatch(/\/v1\/jobs/);

    const submitted = await fetch(`${base}/v1/jobs`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ endpoint: "view", body: view, query: { part: "manifest" } }),
    });
    expect(submitted.status).toBe(202);
    const { id } = (await submitted.json()) as { id: string };
    let state = "";
    for (let k = 0; k < 5000 && state !== "done" && state !== "failed"; k++) {
      state = ((await (await fetch(`${base}/v1/jobs/${id}`)).json()) as { state: string }).state;
      if (state !== "done") await new Promise((r) => setTimeout(r, 100));
    }
    expect(state).toBe("done");
    const manifest = (await (await fetch(`${base}/v1/jobs/${id}/result`)).json()) as { arcPositions: { nodesDeg: number[] }; profile: { shape: { model: string } } };
    expect(manifest.arcPositions.nodesDeg).toEqual([0, 5]);
    expect(manifest.profile.shape.model).toMatch(/Beard & Chuang 1987/);
  });
});
