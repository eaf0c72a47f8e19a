// Jobs across a Redis crash, with a redis-server of the test's own (never the shared one), an API process and
// worker processes as deployed: Redis is killed (SIGKILL) while a worker renders, and started again on the same
// port, with its append-only file (everything comes back) or without persistence (Redis comes back empty).
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { redisServerPresent } from "../../helpers/redis-server.js";
import { statusOf, waitFor } from "../../helpers/service-process.js";
import { skipWithout } from "../../helpers/tools.js";
import { deploy, finished, jobOf, LONG_LUT, running, smallProfile, submit, type Deployment } from "../../helpers/deployment.js";

async function bytes(url: string, init?: RequestInit): Promise<Buffer> {
  const res = await fetch(url, init);
  expect(res.status).toBe(200);
  return Buffer.from(await res.arrayBuffer());
}

async function synchronous(d: Deployment, endpoint: string, body: unknown, format: string): Promise<Buffer> {
  return bytes(`${d.base}/v1/${endpoint}?format=${format}`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
}

/** The LUT's manifest says how long the computation took: everything else must be the same. */
function withoutTime(payload: Buffer) {
  const lut = JSON.parse(payload.toString("utf8")) as { manifest: { computeMs?: number } };
  delete lut.manifest.computeMs;
  return lut;
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
    // The worker logs "job done" just after it marks the job done in Redis: its line may reach this process a moment
    // after the state does (seen under a full test run's load), so it is waited for before it is counted.
    for (const job of [long, ...queued]) {
      await waitFor(`the worker's "job done" for ${job.id}`, () => (d.workers[0].events("job done", job.id).length > 0 ? true : undefined), d.workers);
      expect(d.workers[0].events("job done", job.id)).toHaveLength(1);
    }

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

describe.skipIf(skipWithout(redisServerPresent))("a Redis outage longer than the job's lease", () => {
  let d: Deployment;
  beforeAll(async () => {
    d = await deploy({ appendOnly: true, workers: 1, env: { JOB_LOCK_MS: "2000", JOB_STALLED_INTERVAL_MS: "500" } });
  }, 60_000);
  afterAll(async () => d?.dispose());

  it("ends the job done once with the synchronous answer though its lease lapsed meanwhile", async () => {
    const job = await submit(d, "lut", LONG_LUT, "json");
    await running(d, job.id);
    await d.redis.kill();
    // Twice the lease: the lock's expiry time passes while Redis is away, and counts when it is back.
    await new Promise((r) => setTimeout(r, 4000));
    await d.redis.start();
    const end = await finished(d, job.id, 120_000);
    expect(end.state).toBe("done");
    const result = withoutTime(await bytes(`${d.base}/v1/jobs/${job.id}/result`));
    expect(result).toEqual(withoutTime(await synchronous(d, "lut", LONG_LUT, "json")));
    // Done once: nothing runs the job again after it is done.
    await new Promise((r) => setTimeout(r, 1500));
    expect(await jobOf(d, job.id)).toMatchObject({ state: "done", attempts: end.attempts });
    // Rendered to the end once: a run that the stalled-job check started again finds the job done and skips it.
    expect(d.workers[0].events("job done", job.id)).toHaveLength(1);
  }, 180_000);
});
