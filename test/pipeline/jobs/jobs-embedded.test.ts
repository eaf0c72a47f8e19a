// Background jobs in one process (no REDIS_URL): the job's file must be the synchronous endpoint's file, progress
// must only rise, a cancelled job must stop computing, and every fault must be the documented error.
// The reference for "correct output" here is the project's own synchronous endpoint (POST /v1/profile), whose
// physics the other test files check against published tables; these tests check the job machinery around it.

import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtemp, readdir, rm, stat } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../../http/app.js";
import type { Config } from "../../../pipeline/config/config.js";

// A small profile (one drop size, 20 nm steps): quick, and its PNG has a stable byte stream.
const SMALL_PROFILE = {
  drops: { kind: "monodisperse", radiusUm: 20 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.2 },
};
// Eight texture rows: eight progress stages, about a second of work.
// A texture job long enough (about a second on a quiet machine: 61 wavelengths of Mie rows) for the throttled
// progress (at most 10 reports a second) to show several steps; a short one ends after two.
const SMALL_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 5 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 50, toUm: 400, texels: 8 },
};
// Twenty-four rows of large drops with Lorenz–Mie: about 16 s on one thread, far longer than the cancel checks.
const SLOW_LUT = {
  scenario: { method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 10 } },
  angles: { fromDeg: 36, toDeg: 56, texels: 64 },
  sizes: { kind: "radius", fromUm: 200, toUm: 3000, texels: 24 },
};

interface JobView {
  id: string;
  state: string;
  progress: { fraction: number; stage: string };
  reused: boolean;
  attempts: number;
  error?: string;
}

let folder: string;
let app: FastifyInstance;
let base: string;

function appConfig(cacheDir: string): Partial<Config> {
  // Load shedding and rate limits (set elsewhere) must not answer for the job machinery under test.
  const quiet: Record<string, unknown> = { maxEventLoopDelayMs: 0, rateLimitPerMinute: 0 };
  return { ...quiet, cacheDir, workers: 1, redisUrl: "", jobsInProcess: false, jobConcurrency: 1, jobMaxTermAngles: Infinity } as Partial<Config>;
}

async function submit(endpoint: string, body: unknown, extra: Record<string, unknown> = {}) {
  const res = await fetch(`${base}/v1/jobs`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ endpoint, body, ...extra }) });
  return { status: res.status, location: res.headers.get("location"), job: (await res.json()) as JobView };
}

async function job(id: string): Promise<JobView> {
  return (await (await fetch(`${base}/v1/jobs/${id}`)).json()) as JobView;
}

async function until(id: string, done: (j: JobView) => boolean, timeoutMs = 30_000): Promise<JobView[]> {
  const seen: JobView[] = [];
  const end = Date.now() + timeoutMs;
  for (;;) {
    const j = await job(id);
    seen.push(j);
    if (done(j)) return seen;
    if (Date.now() > end) throw new Error(`job ${id} still ${j.state} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Total bytes and newest change in the kernel cache folder: both stand still when no kernel is computed. */
async function kernelFolderState(): Promise<string> {
  let bytes = 0;
  let newest = 0;
  const walk = async (dir: string) => {
    for (const entry of await readdir(dir, { withFileTypes: true }).catch(() => [])) {
      const path = join(dir, entry.name);
      if (entry.isDirectory()) await walk(path);
      else {
        const s = await stat(path).catch(() => undefined);
        if (s) {
          bytes += s.size;
          newest = Math.max(newest, s.mtimeMs);
        }
      }
    }
  };
  await walk(join(folder, "kernels"));
  return `${bytes}/${newest}`;
}

interface Event {
  event: string;
  data: JobView;
}

async function readEvents(id: string): Promise<{ contentType: string | null; events: Event[] }> {
  const res = await fetch(`${base}/v1/jobs/${id}/events`);
  const text = await res.text(); // the stream ends by itself after its final event
  const events = text
    .split("\n\n")
    .filter((block) => block.includes("data: "))
    .map((block) => {
      const lines = block.split("\n");
      return {
        event: lines.find((l) => l.startsWith("event: "))!.slice(7),
        data: JSON.parse(lines.find((l) => l.startsWith("data: "))!.slice(6)) as JobView,
      };
    });
  return { contentType: res.headers.get("content-type"), events };
}

beforeAll(async () => {
  folder = await mkdtemp(join(tmpdir(), "antisolar-jobs-"));
  app = await buildApp({ config: appConfig(folder) });
  base = await app.listen({ port: 0, host: "127.0.0.1" });
});

afterAll(async () => {
  await app?.close();
  await rm(folder, { recursive: true, force: true });
});

describe("jobs in one process", () => {
  it("answers 202 with a Location, and the finished result is the synchronous endpoint's PNG byte for byte", async () => {
    const submitted = await submit("profile", SMALL_PROFILE, { format: "png", query: { height: 4 } });
    expect(submitted.status).toBe(202);
    expect(submitted.location).toBe(`/v1/jobs/${submitted.job.id}`);
    const seen = await until(submitted.job.id, (j) => j.state === "done");
    expect(seen.at(-1)!.progress).toEqual({ fraction: 1, stage: "done", secondsLeft: 0 });

    const result = await fetch(`${base}/v1/jobs/${submitted.job.id}/result`);
    expect(result.status).toBe(200);
    expect(result.headers.get("content-type")).toBe("image/png");
    const fromJob = Buffer.from(await result.arrayBuffer());

    const sync = await fetch(`${base}/v1/profile?format=png&height=4`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify(SMALL_PROFILE),
    });
    expect(sync.status).toBe(200);
    expect(fromJob.equals(Buffer.from(await sync.arrayBuffer()))).toBe(true);
    expect(result.headers.get("x-antisolar-hash")).toBe(sync.headers.get("x-antisolar-hash"));
  });

  it("a camera view by scattering order as a job is the synchronous endpoint's multi-layer EXR byte for byte", async () => {
    const view = { scenario: { method: "airy", drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 } }, camera: { widthPx: 32, heightPx: 18 } };
    const submitted = await submit("view", view, { query: { format: "exr", layers: "by-order" } });
    expect(submitted.status).toBe(202);
    await until(submitted.job.id, (j) => j.state === "done");
    const fromJob = Buffer.from(await (await fetch(`${base}/v1/jobs/${submitted.job.id}/result`)).arrayBuffer());
    const sync = await fetch(`${base}/v1/view?format=exr&layers=by-order`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(view) });
    expect(sync.status).toBe(200);
    expect(fromJob.equals(Buffer.from(await sync.arrayBuffer()))).toBe(true);
    expect(fromJob.includes(Buffer.from("primary.R\0"))).toBe(true);
  });

  it("reuses a kept result for an identical request, also after a restart (CACHE_DIR/jobs)", async () => {
    const first = await submit("profile", SMALL_PROFILE, { query: { format: "png", height: 4 } });
    expect(first.job).toMatchObject({ state: "done", reused: true });
    const original = Buffer.from(await (await fetch(`${base}/v1/jobs/${first.job.id}/result`)).arrayBuffer());

    const again = await buildApp({ config: appConfig(folder) });
    try {
      const res = await again.inject({ method: "POST", url: "/v1/jobs", payload: { endpoint: "profile", body: SMALL_PROFILE, format: "png", query: { height: 4 } } });
      expect(res.statusCode).toBe(202);
      const view = res.json() as JobView;
      expect(view).toMatchObject({ state: "done", reused: true });
      const kept = await again.inject({ method: "GET", url: `/v1/jobs/${view.id}/result` });
      expect(kept.headers["x-antisolar-cache"]).toBe("hit");
      expect(kept.rawPayload.equals(original)).toBe(true);
    } finally {
      await again.close();
    }
  });

  it("streams progress as server-sent events that only rise and end with a final 'done' event", async () => {
    const { job: j } = await submit("lut", SMALL_LUT, { format: "json" });
    const { contentType, events } = await readEvents(j.id);
    expect(contentType).toMatch(/^text\/event-stream/);
    expect(events.at(-1)!.event).toBe("done");
    expect(events.slice(0, -1).every((e) => e.event === "progress")).toBe(true);
    const fractions = events.map((e) => e.data.progress.fraction);
    for (let k = 1; k < fractions.length; k++) expect(fractions[k]).toBeGreaterThanOrEqual(fractions[k - 1]);
    // The kernel tasks (one per wavelength) move the fraction as they end; several steps must reach the client.
    expect(new Set(fractions.filter((f) => f > 0 && f < 1)).size).toBeGreaterThanOrEqual(3);
    expect(fractions.at(-1)).toBe(1);
    const result = await fetch(`${base}/v1/jobs/${j.id}/result`);
    expect(result.headers.get("content-type")).toMatch(/^application\/json/);
    expect(((await result.json()) as { manifest: { height: number } }).manifest.height).toBe(8);
  });

  it("cancels a running job: its state becomes cancelled, no kernel is computed afterwards, and the next job runs", async () => {
    const { job: slow } = await submit("lut", SLOW_LUT, { format: "json" });
    const running = await until(slow.id, (j) => j.state === "running" && j.progress.fraction > 0);
    const before = running.at(-1)!;

    const early = await fetch(`${base}/v1/jobs/${slow.id}/result`);
    expect(early.status).toBe(409);
    expect(await early.json()).toMatchObject({ error: "job-not-finished" });

    const cancelled = await fetch(`${base}/v1/jobs/${slow.id}`, { method: "DELETE" });
    expect(cancelled.status).toBe(200);
    expect(((await cancelled.json()) as JobView).state).toBe("cancelled");

    // Kernel writes already under way may land; after that the folder must stand still for 2 s, while the whole
    // job would have computed for about 15 s more.
    let state = await kernelFolderState();
    for (let k = 0; k < 20; k++) {
      await new Promise((r) => setTimeout(r, 250));
      const now = await kernelFolderState();
      if (now === state) break;
      state = now;
    }
    await new Promise((r) => setTimeout(r, 2000));
    expect(await kernelFolderState()).toBe(state);
    const after = await job(slow.id);
    expect(after.state).toBe("cancelled");
    expect(after.progress.fraction).toBeLessThan(0.5);
    expect(after.progress.fraction).toBeGreaterThanOrEqual(before.progress.fraction);

    // With one job at a time, the next job can only finish if the cancelled one let go of the queue and the thread.
    const { job: next } = await submit("profile", { ...SMALL_PROFILE, drops: { kind: "monodisperse", radiusUm: 25 } }, { format: "png" });
    await until(next.id, (j) => j.state === "done", 15_000);

    const gone = await fetch(`${base}/v1/jobs/${slow.id}/result`);
    expect(gone.status).toBe(409);
    expect(await gone.json()).toMatchObject({ error: "job-cancelled" });
    const stream = await readEvents(slow.id);
    expect(stream.events.map((e) => e.event)).toEqual(["cancelled"]);
    // Cancelling a finished job changes nothing.
    const again = await fetch(`${base}/v1/jobs/${next.id}`, { method: "DELETE" });
    expect(((await again.json()) as JobView).state).toBe("done");
  });

  it("rejects a faulty job with 400 naming the field inside the job, and answers 404 for an unknown id", async () => {
    const cases: [unknown, string][] = [
      [{ endpoint: "rainbow", body: {} }, "endpoint"],
      [{ endpoint: "profile", body: { drops: { kind: "monodisperse", radiusUm: -1 } } }, "body.drops.radiusUm"],
      [{ endpoint: "profile", body: { colour: "red" } }, "body.colour"],
      [{ endpoint: "profile", body: {}, query: { format: "gif" } }, "query.format"],
      [{ endpoint: "lut", body: {}, format: "png" }, "query.format"],
      [{ endpoint: "view", body: {}, query: { format: "png", layers: "by-order" } }, "query.layers"],
      [{ endpoint: "profile", body: {}, priority: 1 }, "priority"],
    ];
    for (const [payload, field] of cases) {
      const res = await fetch(`${base}/v1/jobs`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(payload) });
      expect(res.status, JSON.stringify(payload)).toBe(400);
      const error = (await res.json()) as { error: string; field: string; message: string };
      expect(error.error).toBe("invalid-request");
      expect(error.field).toBe(field);
      expect(error.message).toContain(field);
    }
    for (const [method, path] of [["GET", ""], ["GET", "/result"], ["GET", "/events"], ["DELETE", ""]] as const) {
      const res = await fetch(`${base}/v1/jobs/no-such-job${path}`, { method });
      expect(res.status, `${method} ${path}`).toBe(404);
      expect(await res.json()).toMatchObject({ error: "not-found", field: "id" });
    }
  });

  it("is ready without Redis", async () => {
    const res = await fetch(`${base}/readyz`);
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ status: "ready", jobs: "in-process" });
  });
});
