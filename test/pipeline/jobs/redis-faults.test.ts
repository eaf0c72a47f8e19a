// Jobs across a Redis crash, with a redis-server of the test's own (never the shared one), an API process and
// worker processes as deployed: Redis is killed (SIGKILL) while a worker renders, and started again on the same
// port, with its append-only file (everything comes back) or without persistence (Redis comes back empty).
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { freePort } from "../../helpers/free-port.js";
import { ownRedis, redisServerPresent, type OwnRedis } from "../../helpers/redis-server.js";
import { API_MAIN, WORKER_MAIN, startService, statusOf, waitFor, type ServiceProcess } from "../../helpers/service-process.js";
import { skipWithout } from "../../helpers/tools.js";

// Ten rows of large drops with Lorenz–Mie: several seconds on one thread, so that Redis can die mid-job.
export const LONG_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 20 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 300, toUm: 2500, texels: 10 },
};
const smallProfile = (radiusUm: number) => ({
  drops: { kind: "monodisperse", radiusUm },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.2 },
});

interface JobView {
  id: string;
  state: string;
  attempts: number;
  progress: { fraction: number };
}

export interface Deployment {
  redis: OwnRedis;
  api: ServiceProcess;
  workers: ServiceProcess[];
  base: string;
  folder: string;
  all(): ServiceProcess[];
  dispose(): Promise<void>;
}

/** Redis of our own, one API process and `workers` worker processes, all ready. */
export async function deploy(options: { appendOnly: boolean; workers: number; env?: Record<string, string> }): Promise<Deployment> {
  const redis = await ownRedis({ appendOnly: options.appendOnly });
  await redis.start();
  const folder = await mkdtemp(join(tmpdir(), "antisolar-faults-"));
  const port = await freePort();
  const env = { REDIS_URL: redis.url, CACHE_DIR: folder, JOB_LOCK_MS: "10000", JOB_STALLED_INTERVAL_MS: "1000", ...options.env };
  const api = startService("api", API_MAIN, { ...env, PORT: String(port) });
  const workers = Array.from({ length: options.workers }, (_, k) => startService(`worker-${k + 1}`, WORKER_MAIN, env));
  const deployment: Deployment = {
    redis,
    api,
    workers,
    base: `http://127.0.0.1:${port}`,
    folder,
    all: () => [api, ...workers],
    async dispose() {
      for (const service of deployment.all()) if (service.running()) service.process.kill("SIGKILL");
      await redis.dispose();
      await rm(folder, { recursive: true, force: true });
    },
  };
  await waitFor("the API to be ready", async () => ((await statusOf(`${deployment.base}/readyz`)) === 200 ? true : undefined), deployment.all(), 30_000);
  for (const worker of workers) await waitFor(`${worker.name} to start`, () => (worker.events("worker ready").length ? true : undefined), deployment.all(), 30_000);
  return deployment;
}

export async function submit(d: Deployment, endpoint: string, body: unknown, format: string): Promise<JobView> {
  const res = await fetch(`${d.base}/v1/jobs`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ endpoint, body, format }) });
  expect(res.status).toBe(202);
  return (await res.json()) as JobView;
}

/** The job as the API gives it, or undefined while the API cannot answer (Redis away). */
export async function jobOf(d: Deployment, id: string): Promise<JobView | undefined> {
  const res = await fetch(`${d.base}/v1/jobs/${id}`).catch(() => undefined);
  return res?.status === 200 ? ((await res.json()) as JobView) : undefined;
}

export async function finished(d: Deployment, id: string, timeoutMs: number): Promise<JobView> {
  return waitFor(`job ${id} to finish`, async () => {
    const job = await jobOf(d, id);
    return job && ["done", "failed", "cancelled"].includes(job.state) ? job : undefined;
  }, d.all(), timeoutMs);
}

export async function running(d: Deployment, id: string): Promise<void> {
  await waitFor(`job ${id} to be running`, async () => {
    const job = await jobOf(d, id);
    return job?.state === "running" && job.progress.fraction > 0 ? true : undefined;
  }, d.all(), 30_000);
}

async function bytes(url: string, init?: RequestInit): Promise<Buffer> {
  const res = await fetch(url, init);
  expect(res.status).toBe(200);
  return Buffer.from(await res.arrayBuffer());
}

async function synchronous(d: Deployment, endpoint: string, body: unknown, format: string): Promise<Buffer> {
  return bytes(`${d.base}/v1/${endpoint}?format=${format}`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
}

describe.skipIf(skipWithout(redisServerPresent))("a Redis crash with the append-only file", () => {
  let d: Deployment;
  beforeAll(async () => {
    d = await deploy({ appendOnly: true, workers: 1 });
  }, 60_000);
  afterAll(async () => d?.dispose());

  it("ends every job queued or running at the crash done once, with the synchronous answer", async () => {
    const long = await submit(d, "lut", LONG_LUT, "json");
    const queued = [await submit(d, "profile", smallProfile(31), "png"), await submit(d, "profile", smallProfile(32), "png")];
    await running(d, long.id);
    await d.redis.kill();
    // The worker goes on computing meanwhile; the API answers 503.
    await new Promise((r) => setTimeout(r, 1500));
    expect((await fetch(`${d.base}/v1/jobs/${long.id}`)).status).toBe(503);
    await d.redis.start();

    for (const job of [long, ...queued]) {
      const end = await finished(d, job.id, 90_000);
      expect(end.state).toBe("done");
    }
    // The outage was shorter than the lease (JOB_LOCK_MS 10 s): the worker stored its own result, no retry.
    expect((await jobOf(d, long.id))?.attempts).toBe(1);
    for (const job of [long, ...queued]) expect(d.workers[0].events("job done", job.id)).toHaveLength(1);

    // The LUT's manifest says how long the computation took: everything else must be the same.
    const withoutTime = (payload: Buffer) => {
      const lut = JSON.parse(payload.toString("utf8")) as { manifest: { computeMs?: number } };
      delete lut.manifest.computeMs;
      return lut;
    };
    const longResult = withoutTime(await bytes(`${d.base}/v1/jobs/${long.id}/result`));
    expect(longResult).toEqual(withoutTime(await synchronous(d, "lut", LONG_LUT, "json")));
    for (const [k, job] of queued.entries()) {
      expect((await bytes(`${d.base}/v1/jobs/${job.id}/result`)).equals(await synchronous(d, "profile", smallProfile(31 + k), "png"))).toBe(true);
    }
  }, 150_000);
});

describe.skipIf(skipWithout(redisServerPresent))("a Redis crash without persistence", () => {
  let d: Deployment;
  beforeAll(async () => {
    d = await deploy({ appendOnly: false, workers: 1 });
  }, 60_000);
  afterAll(async () => d?.dispose());

  it("answers 404 saying the queue lost the jobs it had; the worker finishes its job, reconnects and takes new ones", async () => {
    const long = await submit(d, "lut", LONG_LUT, "json");
    const queued = await submit(d, "profile", smallProfile(33), "png");
    await running(d, long.id);
    await d.redis.kill();
    await new Promise((r) => setTimeout(r, 1000));
    await d.redis.start();
    await waitFor("the API to be ready again", async () => ((await statusOf(`${d.base}/readyz`)) === 200 ? true : undefined), d.all());

    for (const job of [long, queued]) {
      const res = await fetch(`${d.base}/v1/jobs/${job.id}`);
      expect(res.status).toBe(404);
      const body = (await res.json()) as { message: string; lost: boolean };
      expect(body.message).toMatch(/lost by the job queue/);
      expect(body.lost).toBe(true);
    }
    // A made-up id is not "lost": it never existed.
    const unknown = await fetch(`${d.base}/v1/jobs/3b241101-e2bb-4255-8caf-4136c566a962`);
    expect(((await unknown.json()) as { message: string }).message).not.toMatch(/lost/);

    // The worker kept computing through the outage and found the record gone when it came to store the result.
    await waitFor("the worker to finish the job in hand", () => (d.workers[0].events("job lost", long.id).length ? true : undefined), d.all(), 90_000);
    const after = await submit(d, "profile", smallProfile(34), "png");
    expect((await finished(d, after.id, 60_000)).state).toBe("done");
  }, 150_000);
});
