// SIGTERM for worker processes, with Redis up and with Redis away: the process always exits within its grace
// (SHUTDOWN_GRACE_MS), a job it cannot finish goes back to the queue (or, with Redis away, to its lease) and ends
// done elsewhere; a second signal exits at once.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { redisServerPresent } from "../../helpers/redis-server.js";
import { WORKER_MAIN, startService, waitFor, type ServiceProcess } from "../../helpers/service-process.js";
import { skipWithout } from "../../helpers/tools.js";
import { deploy, finished, running, submit, type Deployment } from "../../helpers/deployment.js";

// Sixty-four rows of large drops with Lorenz–Mie: far longer than the grace below on one thread (24 rows took about
// 16 s before the many-drops kernel's cache blocking, then about 4 s: too short to be still computing at the give-back).
const SLOW_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 10 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 200, toUm: 3000, texels: 64 },
};
const GRACE_MS = 5000;
/** Slack for a process to be scheduled and torn down on a loaded machine, beyond the grace itself. */
const EXIT_SLACK_MS = 2000;

async function signalAndTime(service: ServiceProcess, signals: NodeJS.Signals[]): Promise<{ code: number | string; ms: number }> {
  const started = performance.now();
  for (const signal of signals) service.process.kill(signal);
  const code = await service.exited;
  return { code, ms: performance.now() - started };
}

async function holder(d: Deployment, id: string): Promise<ServiceProcess> {
  return waitFor("a worker to start the job", () => d.workers.find((w) => w.events("job started", id).length > 0), d.all());
}

describe.skipIf(skipWithout(redisServerPresent))("SIGTERM to a worker while Redis answers", () => {
  let d: Deployment;
  beforeAll(async () => {
    d = await deploy({ appendOnly: false, workers: 2, env: { SHUTDOWN_GRACE_MS: String(GRACE_MS) } });
  }, 60_000);
  afterAll(async () => d?.dispose());

  it("gives a job it cannot finish in the grace back to the queue and exits in time; the other worker finishes it", async () => {
    const job = await submit(d, "lut", SLOW_LUT, "json");
    await running(d, job.id);
    const first = await holder(d, job.id);
    const { code, ms } = await signalAndTime(first, ["SIGTERM"]);
    expect(code).toBe(0);
    expect(ms).toBeLessThan(GRACE_MS + EXIT_SLACK_MS);
    expect(first.events("job given back", job.id)).toHaveLength(1);

    const other = d.workers.find((w) => w !== first)!;
    await waitFor("the other worker to take the job", () => (other.events("job started", job.id).length ? true : undefined), d.all(), 10_000);
    // The whole LUT on one thread: about 16 s alone, minutes on a machine busy with other tests.
    const end = await finished(d, job.id, 240_000);
    expect(end).toMatchObject({ state: "done", attempts: 2 });
    expect(first.events("job done", job.id)).toHaveLength(0);
  }, 300_000);

  it("exits at once on a second signal, job in hand or not", async () => {
    const job = await submit(d, "lut", { ...SLOW_LUT, sizes: { ...SLOW_LUT.sizes, fromUm: 210 } }, "json");
    const worker = await holder(d, job.id);
    const { code, ms } = await signalAndTime(worker, ["SIGTERM", "SIGINT"]);
    expect(code).toBe(130);
    // Well within the grace: nothing was waited for.
    expect(ms).toBeLessThan(GRACE_MS);
  }, 60_000);
});

describe.skipIf(skipWithout(redisServerPresent))("SIGTERM to a worker while Redis is away", () => {
  let d: Deployment;
  beforeAll(async () => {
    d = await deploy({ appendOnly: true, workers: 1, env: { SHUTDOWN_GRACE_MS: String(GRACE_MS), JOB_LOCK_MS: "3000" } });
  }, 60_000);
  afterAll(async () => d?.dispose());

  it("exits within the grace; the job is retried once its lease has lapsed, and ends done", async () => {
    const job = await submit(d, "lut", SLOW_LUT, "json");
    await running(d, job.id);
    const [first] = d.workers;
    await d.redis.kill();
    const { code, ms } = await signalAndTime(first, ["SIGTERM"]);
    // 0: the orderly stop ended in time, Redis connections dropped without an answer.
    expect(code, first.lines.join("\n")).toBe(0);
    expect(ms).toBeLessThan(GRACE_MS + EXIT_SLACK_MS);
    expect(first.events("job left to its lease", job.id), first.lines.join("\n")).toHaveLength(1);

    await d.redis.start();
    const second = startService("worker-2", WORKER_MAIN, { REDIS_URL: d.redis.url, CACHE_DIR: d.folder, JOB_LOCK_MS: "3000", JOB_STALLED_INTERVAL_MS: "1000" });
    d.workers.push(second);
    const end = await finished(d, job.id, 240_000);
    expect(end).toMatchObject({ state: "done", attempts: 2 });
  }, 300_000);
});
