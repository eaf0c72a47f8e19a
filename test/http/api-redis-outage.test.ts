// The API process (`node dist/http/main.js`) while its Redis is killed and restarted: readiness says so, job
// submissions are refused at once with 503 and Retry-After, synchronous renders go on (the shared kernel store
// fails fast), and everything works again once Redis is back, without a restart of the process.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { freePort } from "../helpers/free-port.js";
import { ownRedis, redisServerPresent, type OwnRedis } from "../helpers/redis-server.js";
import { API_MAIN, startService, statusOf, waitFor, type ServiceProcess } from "../helpers/service-process.js";
import { skipWithout } from "../helpers/tools.js";
import { LONG_LUT } from "../helpers/deployment.js";

const GRACE_MS = 5000;
/** Slack for a process to be scheduled and torn down on a loaded machine, beyond the grace itself. */
const EXIT_SLACK_MS = 2000;

const profile = (temperatureC: number) => ({
  drops: { kind: "monodisperse", radiusUm: 30 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.2 },
  water: { temperatureC, salinityPsu: 0 },
});

let server: OwnRedis;
let api: ServiceProcess;
let base = "";
let folder = "";

async function render(body: unknown): Promise<{ status: number; bytes: Buffer }> {
  const res = await fetch(`${base}/v1/profile?format=png`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
  return { status: res.status, bytes: Buffer.from(await res.arrayBuffer()) };
}

async function submit(body: unknown): Promise<{ res: Response; ms: number }> {
  const started = performance.now();
  const res = await fetch(`${base}/v1/jobs`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ endpoint: "profile", body, format: "json" }) });
  return { res, ms: performance.now() - started };
}

describe.skipIf(skipWithout(redisServerPresent))("the API process while Redis is killed and restarted", () => {
  beforeAll(async () => {
    server = await ownRedis({ appendOnly: false });
    await server.start();
    folder = await mkdtemp(join(tmpdir(), "antisolar-api-outage-"));
    const port = await freePort();
    base = `http://127.0.0.1:${port}`;
    api = startService("api", API_MAIN, { REDIS_URL: server.url, CACHE_DIR: folder, PORT: String(port), SHUTDOWN_GRACE_MS: String(GRACE_MS) });
    await waitFor("the API to be ready", async () => ((await statusOf(`${base}/readyz`)) === 200 ? true : undefined), [api], 30_000);
  }, 40_000);

  afterAll(async () => {
    if (api?.running()) api.process.kill("SIGKILL");
    await server?.dispose();
    if (folder) await rm(folder, { recursive: true, force: true });
  });

  let duringOutage: Buffer;

  it("answers while Redis is away: not ready, job submissions 503 with Retry-After within a second, renders as usual", async () => {
    expect((await render(profile(15))).status).toBe(200);
    await server.kill();
    await waitFor("readiness to fail", async () => ((await statusOf(`${base}/readyz`)) === 503 ? true : undefined), [api]);

    const { res, ms } = await submit(profile(16));
    expect(res.status).toBe(503);
    expect(res.headers.get("retry-after")).toBe("5");
    expect(((await res.json()) as { error: string; message: string }).message).toMatch(/Redis/);
    // The requirement (an answer within a second), with the HTTP round trip on a loaded machine included.
    expect(ms).toBeLessThan(1000);

    const cold = await render(profile(17));
    expect(cold.status).toBe(200);
    duringOutage = cold.bytes;
  }, 30_000);

  it("reconnects by itself when Redis is back (empty): ready again, jobs accepted, the same render", async () => {
    await server.start();
    await waitFor("readiness to come back", async () => ((await statusOf(`${base}/readyz`)) === 200 ? true : undefined), [api], 20_000);
    const { res } = await submit(profile(18));
    expect(res.status).toBe(202);
    // Rendered again (the answer cache of the process may serve it): byte for byte what was rendered during the outage.
    expect((await render(profile(17))).bytes.equals(duringOutage)).toBe(true);
  }, 30_000);

  it("exits within its grace on SIGTERM while Redis is away, with a long request in flight", async () => {
    await server.kill();
    await waitFor("readiness to fail", async () => ((await statusOf(`${base}/readyz`)) === 503 ? true : undefined), [api]);
    // Several seconds of Lorenz–Mie: still running when the grace's abandon time comes.
    const inFlight = fetch(`${base}/v1/lut?format=json`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(LONG_LUT) }).then(
      (res) => res.status,
      () => "aborted",
    );
    await new Promise((r) => setTimeout(r, 500));
    const started = performance.now();
    api.process.kill("SIGTERM");
    const code = await api.exited;
    const ms = performance.now() - started;
    expect(code, api.lines.join("\n")).toBe(0);
    expect(ms).toBeLessThan(GRACE_MS + EXIT_SLACK_MS);
    // Finished or cut off, never left hanging.
    expect([200, "aborted"]).toContain(await inFlight);
    expect(await statusOf(`${base}/healthz`)).toBe(0);
  }, 30_000);
});
