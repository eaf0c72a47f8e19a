// Scale-out jobs: two API processes and two worker processes against one Redis, as deployed. A worker killed in
// the middle of a job must not lose it; a result rendered through one API process must be served by the other;
// cancelling must stop the worker's computation. Redis comes from TEST_REDIS_URL (.ci/redis.sh starts one in CI);
// elsewhere a local redis-server binary is started for the test if there is one.

import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { randomBytes } from "node:crypto";
import { Redis } from "ioredis";
import { programRuns, skipWithout } from "../../helpers/tools.js";
import { freePort } from "../../helpers/free-port.js";

const repo = fileURLToPath(new URL("../../..", import.meta.url));

const SMALL_PROFILE = {
  drops: { kind: "monodisperse", radiusUm: 30 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.2 },
};
// Ten rows of large drops with Lorenz–Mie: several seconds on one thread, so that a worker can be killed mid-job.
const KILL_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 20 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 300, toUm: 2500, texels: 10 },
};
// Twenty-four rows: about 16 s on one thread, far longer than the cancel checks.
const SLOW_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 10 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 200, toUm: 3000, texels: 24 },
};

// Forty radius nodes of millimetre drops, each by Lorenz–Mie, 31 wavelengths: several seconds on one thread, one
// kernel task per wavelength, so a worker killed part-way has kept some wavelengths' rows in Redis.
const RESUMABLE_PROFILE = {
  drops: { kind: "lognormal", medianRadiusUm: 800, geometricSd: 1.2, totalNumberPerM3: 1000 },
  method: "mie",
  mieSizesPerDecade: 64,
  spectral: { fromNm: 400, toNm: 700, stepNm: 10 },
};

interface JobView {
  id: string;
  state: string;
  progress: { fraction: number; stage: string };
  reused: boolean;
  attempts: number;
}

interface Child {
  name: string;
  process: ChildProcess;
  lines: string[];
}

const children: Child[] = [];
let redisUrl = "";
let ownRedis: ChildProcess | undefined;
let redis: Redis | undefined;
let folder = "";
const prefix = `antisolar-test-${randomBytes(4).toString("hex")}`;
let apiA = "";
let apiB = "";

/** TEST_REDIS_URL, or a redis-server of our own outside CI; CI must provide the URL (.ci/redis.sh). */
async function findRedis(): Promise<string> {
  if (process.env.TEST_REDIS_URL) return process.env.TEST_REDIS_URL;
  if (process.env.CI === "true") throw new Error("CI must set TEST_REDIS_URL: source .ci/redis.sh in .ci/run");
  if (spawnSync("redis-server", ["--version"]).status !== 0) return "";
  const port = await freePort();
  ownRedis = spawn("redis-server", ["--bind", "127.0.0.1", "--port", String(port), "--save", "", "--appendonly", "no"], { stdio: "ignore" });
  const url = `redis://127.0.0.1:${port}`;
  const probe = new Redis(url, { lazyConnect: true, maxRetriesPerRequest: 0, retryStrategy: () => 100 });
  probe.on("error", () => undefined);
  for (let k = 0; k < 50; k++) {
    if (await probe.ping().then(() => true, () => false)) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  probe.disconnect();
  return url;
}

function start(name: string, script: string, env: Record<string, string>): Child {
  const child: Child = {
    name,
    process: spawn(process.execPath, [join(repo, script)], {
      cwd: repo,
      env: {
        ...process.env,
        REDIS_URL: redisUrl,
        REDIS_PREFIX: prefix,
        CACHE_DIR: folder,
        WORKERS: "1",
        HOST: "127.0.0.1",
        LOG_LEVEL: "warn",
        JOB_LOCK_MS: "3000",
        JOB_STALLED_INTERVAL_MS: "1000",
        // Load shedding and rate limits must not answer for the job machinery under test.
        MAX_EVENT_LOOP_DELAY_MS: "600000",
        RATE_LIMIT_PER_MINUTE: "0",
        ...env,
      },
      stdio: ["ignore", "pipe", "pipe"],
    }),
    lines: [],
  };
  let rest = "";
  const collect = (chunk: Buffer) => {
    rest += chunk.toString("utf8");
    const parts = rest.split("\n");
    rest = parts.pop()!;
    child.lines.push(...parts);
  };
  child.process.stdout!.on("data", collect);
  child.process.stderr!.on("data", collect);
  children.push(child);
  return child;
}

async function waitFor<T>(what: string, probe: () => Promise<T | undefined> | T | undefined, timeoutMs = 20_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value !== undefined) return value;
    if (Date.now() > end) {
      const logs = children.map((c) => `--- ${c.name}\n${c.lines.slice(-15).join("\n")}`).join("\n");
      throw new Error(`timed out waiting for ${what}\n${logs}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}

function logged(child: Child, msg: string, id: string): boolean {
  return child.lines.some((line) => line.includes(`"msg":"${msg}"`) && line.includes(id));
}

async function submit(api: string, endpoint: string, body: unknown, format: string) {
  const res = await fetch(`${api}/v1/jobs`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ endpoint, body, format }) });
  expect(res.status).toBe(202);
  return (await res.json()) as JobView;
}

async function job(api: string, id: string): Promise<JobView> {
  return (await (await fetch(`${api}/v1/jobs/${id}`)).json()) as JobView;
}

/** Bytes of kernel packs in Redis: they stand still when no process computes kernels. */
async function kernelBytes(): Promise<number> {
  let total = 0;
  let cursor = "0";
  do {
    const [next, keys] = await redis!.scan(cursor, "MATCH", `${prefix}:kernel:*`, "COUNT", 1000);
    cursor = next;
    for (const key of keys) total += await redis!.strlen(key);
  } while (cursor !== "0");
  return total;
}

function stopChildren() {
  for (const c of children) if (c.process.exitCode === null && c.process.signalCode === null) c.process.kill("SIGKILL");
}

function stopRedis() {
  if (ownRedis && ownRedis.exitCode === null && ownRedis.signalCode === null) ownRedis.kill("SIGKILL");
}

process.once("exit", () => {
  stopChildren();
  stopRedis();
});

beforeAll(async () => {
  redisUrl = await findRedis();
  if (!redisUrl) return;
  redis = new Redis(redisUrl, { maxRetriesPerRequest: 1 });
  redis.on("error", () => undefined);
  folder = await mkdtemp(join(tmpdir(), "antisolar-jobs-redis-"));
  const [portA, portB] = [await freePort(), await freePort()];
  start("api-a", "dist/http/main.js", { PORT: String(portA) });
  start("api-b", "dist/http/main.js", { PORT: String(portB) });
  start("worker-1", "dist/pipeline/jobs/worker-main.js", {});
  start("worker-2", "dist/pipeline/jobs/worker-main.js", {});
  apiA = `http://127.0.0.1:${portA}`;
  apiB = `http://127.0.0.1:${portB}`;
  for (const api of [apiA, apiB]) {
    await waitFor(`${api}/readyz`, async () => ((await fetch(`${api}/readyz`).catch(() => undefined))?.status === 200 ? true : undefined), 38_000);
  }
  for (const worker of children.filter((c) => c.name.startsWith("worker"))) {
    await waitFor(`${worker.name} to start`, () => (worker.lines.some((l) => l.includes('"msg":"worker ready"')) ? true : undefined));
  }
}, 90_000);

afterAll(async () => {
  stopChildren();
  if (redis && !ownRedis) {
    let cursor = "0";
    do {
      const [next, keys] = await redis.scan(cursor, "MATCH", `${prefix}:*`, "COUNT", 1000);
      cursor = next;
      if (keys.length) await redis.del(...keys);
    } while (cursor !== "0");
  }
  redis?.disconnect();
  stopRedis();
  if (folder) await rm(folder, { recursive: true, force: true });
});

/** A Redis to run against: CI's TEST_REDIS_URL, or a redis-server this file starts. Skipped where neither exists; CI has one. */
const redisAvailable = Boolean(process.env.TEST_REDIS_URL) || programRuns("redis-server", ["--version"]);

describe.skipIf(skipWithout(redisAvailable))("jobs through Redis with two API processes and two workers", () => {
  it("has a Redis to run against (CI provides TEST_REDIS_URL)", () => {
    expect(redisUrl).not.toBe("");
  });

  it("serves a result rendered through one API process from the other, and reports it on the other's event stream", async () => {
    const first = await submit(apiA, "profile", SMALL_PROFILE, "png");
    const stream = await (await fetch(`${apiB}/v1/jobs/${first.id}/events`)).text();
    expect(stream.trimEnd().split("\n\n").at(-1)).toMatch(/^id: \d+\nevent: done\n/);
    const fromA = Buffer.from(await (await fetch(`${apiA}/v1/jobs/${first.id}/result`)).arrayBuffer());
    expect((await job(apiB, first.id)).state).toBe("done");

    const second = await submit(apiB, "profile", SMALL_PROFILE, "png");
    expect(second).toMatchObject({ state: "done", reused: true });
    const res = await fetch(`${apiB}/v1/jobs/${second.id}/result`);
    expect(res.headers.get("content-type")).toBe("image/png");
    expect(Buffer.from(await res.arrayBuffer()).equals(fromA)).toBe(true);

    // And it is the synchronous endpoint's PNG, rendered by API process B itself with kernels shared through Redis.
    const sync = await fetch(`${apiB}/v1/profile?format=png`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(SMALL_PROFILE) });
    expect(Buffer.from(await sync.arrayBuffer()).equals(fromA)).toBe(true);
  });

  it("retries a job whose worker is killed mid-render, and completes it once", async () => {
    const submitted = await submit(apiA, "lut", KILL_LUT, "json");
    const workers = children.filter((c) => c.name.startsWith("worker"));
    const victim = await waitFor("a worker to start the job", () => workers.find((w) => logged(w, "job started", submitted.id)));
    await waitFor("progress", async () => ((await job(apiA, submitted.id)).progress.fraction > 0 ? true : undefined));
    victim.process.kill("SIGKILL");
    const survivor = workers.find((w) => w !== victim)!;

    const done = await waitFor("the retried job", async () => {
      const j = await job(apiB, submitted.id);
      return j.state === "done" || j.state === "failed" ? j : undefined;
    }, 45_000);
    expect(done.state).toBe("done");
    expect(done.attempts).toBe(2);
    expect(logged(victim, "job done", submitted.id)).toBe(false);
    // The worker logs "job done" after it marks the job done in Redis: its line may reach this process after the state.
    await waitFor("the survivor's log of the job", () => (logged(survivor, "job done", submitted.id) ? true : undefined));
    expect(survivor.lines.filter((l) => l.includes('"msg":"job done"') && l.includes(submitted.id))).toHaveLength(1);
    const result = await fetch(`${apiB}/v1/jobs/${submitted.id}/result`);
    expect(result.status).toBe(200);
    expect(((await result.json()) as { manifest: { height: number } }).manifest.height).toBe(10);
  }, 60_000);

  it("a retried job resumes its progress from the kernel rows the dead worker kept, not from zero", async () => {
    // The earlier test killed a worker: start another, so that two are alive.
    const fresh = start("worker-3", "dist/pipeline/jobs/worker-main.js", {});
    await waitFor("worker-3 to start", () => (fresh.lines.some((l) => l.includes('"msg":"worker ready"')) ? true : undefined), 30_000);
    const alive = children.filter((c) => c.name.startsWith("worker") && c.process.exitCode === null && c.process.signalCode === null);
    const submitted = await submit(apiA, "profile", RESUMABLE_PROFILE, "json");
    const victim = await waitFor("a worker to start the job", () => alive.find((w) => logged(w, "job started", submitted.id)));
    const reached = await waitFor("a quarter of the work", async () => {
      const j = await job(apiA, submitted.id);
      return j.progress.fraction >= 0.25 ? j.progress.fraction : undefined;
    }, 90_000);
    victim.process.kill("SIGKILL");
    const retry = await waitFor("the retry's first progress", () => {
      for (const w of alive.filter((c) => c !== victim)) {
        const line = w.lines.find((l) => l.includes('"msg":"job progress"') && l.includes(submitted.id));
        if (line) return JSON.parse(line) as { attempt: number; fraction: number };
      }
      return undefined;
    }, 30_000);
    expect(retry.attempt).toBe(2);
    // Rows of tasks still running when the worker died are lost; those of finished tasks count at once.
    expect(retry.fraction).toBeGreaterThan(0.5 * reached);
    const done = await waitFor("the retried job", async () => {
      const j = await job(apiB, submitted.id);
      return j.state === "done" || j.state === "failed" ? j : undefined;
    }, 120_000);
    expect(done).toMatchObject({ state: "done", attempts: 2, progress: { fraction: 1, stage: "done", secondsLeft: 0 } });
    // Kernel writes trail the answer (they never hold it up): let them land before the next test counts bytes.
    let bytes = -1;
    await waitFor("the kernel writes to end", async () => {
      const now = await kernelBytes();
      const still = now === bytes;
      bytes = now;
      await new Promise((r) => setTimeout(r, 1000));
      return still ? true : undefined;
    }, 60_000);
  }, 300_000);

  it("cancels a running job through the other API process: the worker stops computing", async () => {
    const submitted = await submit(apiB, "lut", SLOW_LUT, "json");
    const worker = await waitFor("a worker to start the job", () => children.find((w) => w.name.startsWith("worker") && logged(w, "job started", submitted.id)));
    await waitFor("progress", async () => ((await job(apiB, submitted.id)).progress.fraction > 0 ? true : undefined));
    const res = await fetch(`${apiA}/v1/jobs/${submitted.id}`, { method: "DELETE" });
    expect(((await res.json()) as JobView).state).toBe("cancelled");

    await waitFor("the worker to stop", () => (logged(worker, "job cancelled", submitted.id) ? true : undefined), 5_000);
    // Writes already under way may land; then no kernel may be added for 2 s, while the whole job needed ~15 s more.
    await new Promise((r) => setTimeout(r, 300));
    const bytes = await kernelBytes();
    await new Promise((r) => setTimeout(r, 2000));
    expect(await kernelBytes()).toBe(bytes);
    expect((await job(apiB, submitted.id)).state).toBe("cancelled");
    expect(logged(worker, "job done", submitted.id)).toBe(false);
    const result = await fetch(`${apiA}/v1/jobs/${submitted.id}/result`);
    expect(result.status).toBe(409);
  }, 30_000);

  it("is ready while Redis answers", async () => {
    const res = await fetch(`${apiA}/readyz`);
    expect(await res.json()).toMatchObject({ status: "ready", jobs: "redis" });
  });
});
