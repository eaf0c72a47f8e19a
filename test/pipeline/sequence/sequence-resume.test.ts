// A sequence job whose worker is killed mid-sequence (SIGKILL) resumes on the other worker from the frames the dead
// one kept in Redis: the retry renders only the missing frames, and the archive is byte for byte the archive of an
// uninterrupted run. A redis-server of the test's own (test/helpers/deployment.ts), never a shared one.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { Redis } from "ioredis";
import { redisServerPresent } from "../../helpers/redis-server.js";
import { waitFor, type ServiceProcess } from "../../helpers/service-process.js";
import { skipWithout } from "../../helpers/tools.js";
import { deploy, finished, type Deployment } from "../../helpers/deployment.js";

const FRAMES = 24;
// An invented lakeside at 46.8° N, 9.1° E, a June afternoon: 640 × 360 views, a fraction of a second each once the
// first frame has computed the kernels, so that the worker is killed with most frames still to render.
const SEQUENCE_JOB = {
  endpoint: "view",
  body: {
    scenario: { spectral: { fromNm: 400, toNm: 700, stepNm: 20 } },
    sun: { at: { utc: "2026-06-21T14:00:00Z", latitudeDeg: 46.8, longitudeDeg: 9.1 } },
    camera: { widthPx: 640, heightPx: 360, horizontalFovDeg: 100 },
  },
  format: "png",
  sequence: { fromUtc: "2026-06-21T14:00:00Z", toUtc: "2026-06-21T16:00:00Z", frames: FRAMES },
};
/** Frames the first worker must have kept before it is killed. */
const KEPT_BEFORE_KILL = 3;

interface JobView {
  id: string;
  hash: string;
  state: string;
  attempts: number;
}

async function submit(d: Deployment): Promise<JobView> {
  const res = await fetch(`${d.base}/v1/jobs`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(SEQUENCE_JOB) });
  expect(res.status).toBe(202);
  return (await res.json()) as JobView;
}

async function archiveOf(d: Deployment, id: string): Promise<Buffer> {
  const res = await fetch(`${d.base}/v1/jobs/${id}/result`);
  expect(res.status).toBe(200);
  expect(res.headers.get("content-type")).toBe("application/x-tar");
  return Buffer.from(await res.arrayBuffer());
}

const rendered = (w: ServiceProcess, id: string) => w.events("frame kept", id).length;

describe.skipIf(skipWithout(redisServerPresent))("a sequence job whose worker dies", () => {
  let d: Deployment;
  let redis: Redis;
  beforeAll(async () => {
    d = await deploy({ appendOnly: false, workers: 2, env: { JOB_LOCK_MS: "3000" } });
    redis = new Redis(d.redis.url, { maxRetriesPerRequest: 1 });
  }, 90_000);
  afterAll(async () => {
    redis?.disconnect();
    await d?.dispose();
  });

  it("resumes from the last finished frame on the other worker; the archive equals an uninterrupted run's", async () => {
    const job = await submit(d);
    const victim = await waitFor("a worker to start the job", () => d.workers.find((w) => w.events("job started", job.id).length > 0), d.all(), 30_000);
    // The first frame computes the kernels (seconds); the later ones reuse them.
    await waitFor(`${KEPT_BEFORE_KILL} frames kept`, () => (rendered(victim, job.id) >= KEPT_BEFORE_KILL ? true : undefined), d.all(), 180_000);
    victim.process.kill("SIGKILL");
    await victim.exited;
    // What Redis holds (a frame may have landed just before the kill, its log line not yet read).
    const keptByVictim = await redis.hlen(`antisolar:frames:${job.hash}`);
    expect(keptByVictim).toBeGreaterThanOrEqual(KEPT_BEFORE_KILL);
    expect(keptByVictim).toBeLessThan(FRAMES);
    // Nothing partial is a finished result: only the frames are in Redis, not an archive.
    expect(await redis.exists(`antisolar:result:${job.hash}`)).toBe(0);

    const survivor = d.workers.find((w) => w !== victim)!;
    const end = await finished(d, job.id, 240_000);
    expect(end).toMatchObject({ state: "done", attempts: 2 });
    const resumed = survivor.events("frames resumed", job.id);
    expect(resumed).toHaveLength(1);
    expect(resumed[0].kept).toBe(keptByVictim);
    // The retry rendered exactly the missing frames, and only those.
    expect(rendered(survivor, job.id)).toBe(FRAMES - keptByVictim);
    const indices = survivor.events("frame kept", job.id).map((e) => e.index as number);
    expect(Math.min(...indices)).toBe(keptByVictim);
    const resumedArchive = await archiveOf(d, job.id);
    // The frames are dropped once the archive is stored.
    expect(await redis.exists(`antisolar:frames:${job.hash}`)).toBe(0);

    // The same sequence uninterrupted: with its stored result removed, submitted again and rendered whole.
    await redis.del(`antisolar:result:${job.hash}`);
    const again = await submit(d);
    expect(again.hash).toBe(job.hash);
    const whole = await finished(d, again.id, 240_000);
    expect(whole).toMatchObject({ state: "done", attempts: 1 });
    expect(survivor.events("frames resumed", again.id)[0].kept).toBe(0);
    expect(rendered(survivor, again.id)).toBe(FRAMES);
    expect((await archiveOf(d, again.id)).equals(resumedArchive)).toBe(true);
  }, 600_000);
});
