// Under back-pressure the 503 is the whole answer: the route's handler does not run. (Found by npm run hostile: the
// server's log held fastify's "Reply was already sent" after a 503; under-pressure went on to the route whenever
// the pressure handler returned nothing, so the work the 503 refused was done anyway.)
import { describe, it, expect } from "vitest";
import { Writable } from "node:stream";
import Fastify from "fastify";
import { registerHardening } from "../../../http/plugins/hardening.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";
import { loadConfig } from "../../../pipeline/config/config.js";

describe("back-pressure", () => {
  it("answers 503 with Retry-After in the error shape and never runs the route; /healthz still runs", async () => {
    const log: string[] = [];
    const stream = new Writable({ write: (chunk: Buffer, _e, done) => (log.push(chunk.toString()), done()) });
    const app = Fastify({ logger: { level: "warn", stream } });
    app.setErrorHandler((error, request, reply) => {
      if (error instanceof ClientError) return reply.status(error.status).send(error.toBody(request.id));
      return reply.status(500).send({ error: "internal" });
    });
    // 1 MiB of resident memory: always over the limit once sampled.
    await registerHardening(app, { ...loadConfig({}), maxRssMb: 1, rateLimitPerMinute: 0 });
    let runs = 0;
    app.get("/work", async () => ({ runs: ++runs }));
    app.get("/healthz", async () => ({ ok: true }));
    await app.ready();
    // @fastify/under-pressure samples memory once a second (its default sampleInterval).
    await new Promise((resolve) => setTimeout(resolve, 1200));
    const res = await app.inject({ method: "GET", url: "/work" });
    expect(res.statusCode).toBe(503);
    expect(res.headers["retry-after"]).toBe("5");
    expect(res.json()).toMatchObject({ error: "overloaded", requestId: expect.any(String) });
    expect(runs).toBe(0);
    expect((await app.inject({ method: "GET", url: "/healthz" })).statusCode).toBe(200);
    await app.close();
    expect(log.join("")).not.toContain("already sent");
  });
});
