import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import type { Config } from "../../pipeline/config/config.js";

let app: FastifyInstance;
beforeAll(async () => {
  // Jobs in this process, no Redis; no event-loop guard or rate limit answering for the job machinery under test.
  const config = { cacheDir: "", workers: 1, redisUrl: "", jobsInProcess: true, jobConcurrency: 1, maxEventLoopDelayMs: 0, rateLimitPerMinute: 0 };
  app = await buildApp({ config: config as Partial<Config> });
  await app.ready();
});
afterAll(async () => app.close());

// An invented hillside at 47.2° N, 8.4° E on a June evening.
const body = {
  sun: { at: { utc: "2026-06-21T18:00:00Z", latitudeDeg: 47.2, longitudeDeg: 8.4 } },
  angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.5 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
};

describe("POST /v1/jobs with a sequence", () => {
  it("renders the frames as one tar archive, with progress counted in frames", { timeout: 120_000 }, async () => {
    const submitted = await request(app.server)
      .post("/v1/jobs")
      .send({ endpoint: "profile", body, format: "png", sequence: { fromUtc: "2026-06-21T18:00:00Z", toUtc: "2026-06-21T18:40:00Z", frames: 3 } });
    expect(submitted.status, submitted.text).toBe(202);
    expect(submitted.body.endpoint).toBe("sequence");
    const id = submitted.body.id;
    let state = submitted.body.state;
    for (let i = 0; i < 600 && !["done", "failed", "cancelled"].includes(state); i++) {
      await new Promise((r) => setTimeout(r, 100));
      state = (await request(app.server).get(`/v1/jobs/${id}`)).body.state;
    }
    expect(state).toBe("done");
    const result = await request(app.server).get(`/v1/jobs/${id}/result`).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => cb(null, Buffer.concat(chunks)));
    });
    expect(result.headers["content-type"]).toMatch(/application\/x-tar/);
    const tar = result.body as Buffer;
    // ustar headers: each entry's name at its 512-byte header's start, "ustar" at offset 257 (POSIX.1-1988 tar format).
    expect(tar.subarray(257, 262).toString("latin1")).toBe("ustar");
    expect(tar.subarray(0, 14).toString("latin1")).toBe("frame-0001.png");
    expect(tar.includes(Buffer.from("manifest.json"))).toBe(true);
  });

  it("streams progress counted in frames, rising, with the time left once a frame has been timed", { timeout: 120_000 }, async () => {
    const submitted = await request(app.server)
      .post("/v1/jobs")
      // Camera views of 640 × 360 (about 150 ms a frame with cached kernels, bench/sequence.ts), so that each frame
      // outlasts the job stream's 100 ms between updates (throttled-progress.ts): profile frames now take a few
      // milliseconds once their kernels are cached, and frames 2–5 could all fall between two updates. Water of its
      // own, so that the first frame computes its kernels (not cached by the test above) while the stream opens.
      .send({
        endpoint: "view",
        body: { sun: body.sun, camera: { widthPx: 640, heightPx: 360, horizontalFovDeg: 100 }, scenario: { water: { temperatureC: 4 }, spectral: body.spectral } },
        query: { format: "png" },
        sequence: { fromUtc: "2026-06-21T17:00:00Z", toUtc: "2026-06-21T18:00:00Z", frames: 5 },
      });
    expect(submitted.status, submitted.text).toBe(202);
    const stream = await request(app.server).get(`/v1/jobs/${submitted.body.id}/events`).buffer(true).parse((res, cb) => {
      let text = "";
      res.on("data", (c: Buffer) => (text += c.toString("utf8")));
      res.on("end", () => cb(null, text));
    });
    const events = (stream.body as string)
      .split("\n\n")
      .map((block) => ({ event: /^event: (\w+)$/m.exec(block)?.[1], data: /^data: (.*)$/m.exec(block)?.[1] }))
      .filter((e) => e.event && e.data)
      .map((e) => ({ event: e.event!, job: JSON.parse(e.data!) as { progress: { fraction: number; stage: string; secondsLeft: number | null } } }));
    expect(events.at(-1)!.event).toBe("done");
    // Between the job's own first stages (queued, starting) and its last (done), every stage counts frames.
    const progress = events.filter((e) => e.event === "progress" && !["queued", "starting", "done"].includes(e.job.progress.stage)).map((e) => e.job.progress);
    expect(progress.length).toBeGreaterThan(0);
    for (const p of progress) expect(p.stage).toMatch(/^frame [1-5] of 5$/);
    for (let k = 1; k < progress.length; k++) expect(progress[k].fraction).toBeGreaterThanOrEqual(progress[k - 1].fraction);
    // After the first frame the latest frame's time stands for each frame to go.
    expect(progress.some((p) => /^frame [2-5] of 5$/.test(p.stage) && typeof p.secondsLeft === "number")).toBe(true);
  });

  it("refuses over 400 frames and a body without a place with 400s naming the field", async () => {
    const over = await request(app.server).post("/v1/jobs").send({ endpoint: "view", body, sequence: { fromUtc: "2026-06-21T18:00:00Z", toUtc: "2026-06-21T19:00:00Z", frames: 401 } });
    expect(over.status).toBe(400);
    expect(over.body.field).toBe("sequence.frames");
    const placeless = await request(app.server).post("/v1/jobs").send({ endpoint: "profile", body: { angles: body.angles }, sequence: { fromUtc: "2026-06-21T18:00:00Z", toUtc: "2026-06-21T19:00:00Z", frames: 2 } });
    expect(placeless.status).toBe(400);
    expect(placeless.body.field).toBe("body.sun.at");
  });
});
