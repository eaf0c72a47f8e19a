// A scale-out deployment for fault tests: a redis-server of the test's own, one API process and worker processes,
// and the job requests the tests make through the API.
import { expect } from "vitest";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { freePort } from "./free-port.js";
import { ownRedis, type OwnRedis } from "./redis-server.js";
import { API_MAIN, WORKER_MAIN, startService, statusOf, waitFor, type ServiceProcess } from "./service-process.js";

// Ten rows of large drops with Lorenz–Mie: several seconds on one thread, so that Redis can die mid-job.
export const LONG_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 20 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 300, toUm: 2500, texels: 10 },
};
export const smallProfile = (radiusUm: number) => ({
  drops: { kind: "monodisperse", radiusUm },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.2 },
});

export interface JobView {
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

