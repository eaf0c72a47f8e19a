// A long job shows its progress as it goes: a render of well over ten seconds on one thread (a Marshall–Palmer
// 25 mm/h shower with Lorenz–Mie for every drop) must stream at least ten distinct, rising fractions before its
// final event, with an estimate of the time left. The one slow test of the job machinery: it is the user's case.

import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../../http/app.js";
import type { Config } from "../../../pipeline/config/config.js";

// Full Mie to the 3 mm cap, 26 wavelengths: about 12 s on one unloaded thread (BENCHMARKS.md P3 has 41 in 21 s).
const SHOWER = {
  drops: { kind: "marshall-palmer", rainRateMmPerH: 25 },
  method: "mie",
  spectral: { fromNm: 400, toNm: 700, stepNm: 12 },
};

interface Progress {
  fraction: number;
  stage: string;
  secondsLeft?: number | null;
}

let folder: string;
let app: FastifyInstance;
let base: string;

beforeAll(async () => {
  folder = await mkdtemp(join(tmpdir(), "antisolar-job-progress-"));
  const config = { maxEventLoopDelayMs: 0, rateLimitPerMinute: 0, cacheDir: folder, workers: 1, redisUrl: "", jobsInProcess: false, jobConcurrency: 1, jobMaxTermAngles: Infinity };
  app = await buildApp({ config: config as Partial<Config> });
  base = await app.listen({ port: 0, host: "127.0.0.1" });
});

afterAll(async () => {
  await app?.close();
  await rm(folder, { recursive: true, force: true });
});

describe("progress of a long job", () => {
  it("streams at least ten distinct rising fractions before done, with the stage and the time left", async () => {
    const submitted = await fetch(`${base}/v1/jobs`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ endpoint: "profile", body: SHOWER }) });
    expect(submitted.status).toBe(202);
    const { id } = (await submitted.json()) as { id: string };
    const text = await (await fetch(`${base}/v1/jobs/${id}/events`)).text();
    const events = text
      .split("\n\n")
      .filter((block) => block.includes("data: "))
      .map((block) => ({
        event: block.match(/^event: (.*)$/m)![1],
        job: JSON.parse(block.match(/^data: (.*)$/m)![1]) as { state: string; progress: Progress; startedAt: string; finishedAt?: string },
      }));
    expect(events.at(-1)!.event).toBe("done");
    const before = events.slice(0, -1).map((e) => e.job.progress);
    const fractions = before.map((p) => p.fraction);
    for (let k = 1; k < fractions.length; k++) expect(fractions[k]).toBeGreaterThanOrEqual(fractions[k - 1]);
    const distinct = new Set(fractions.filter((f) => f > 0 && f < 1));
    expect(distinct.size).toBeGreaterThanOrEqual(10);
    // Kernel rows are the bulk of the work, then the later stages are named.
    expect(before.map((p) => p.stage)).toContain("kernels");
    expect(before.some((p) => typeof p.secondsLeft === "number" && p.secondsLeft > 0)).toBe(true);
    const last = events.at(-1)!.job;
    expect(last.progress).toEqual({ fraction: 1, stage: "done", secondsLeft: 0 });
    const seconds = (Date.parse(last.finishedAt!) - Date.parse(last.startedAt)) / 1000;
    console.log(`long job: ${seconds.toFixed(1)} s, ${events.length - 1} progress events, ${distinct.size} distinct fractions`);
  }, 600_000);
});
