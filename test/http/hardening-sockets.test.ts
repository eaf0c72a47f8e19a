// The same failure modes as hardening.test.ts seen by an HTTP client of the real app: a crashed kernel worker
// gives a 500 that hides internals (DEVELOPERS.md: anything but a ClientError is a 500, a bug; OWASP Error
// Handling Cheat Sheet: no stack traces to clients), a client that hangs up stops its kernel work, and app.close()
// lets a request in flight finish (Node's server.close(): stop accepting connections, let open ones finish). The app's kernel pool runs the test-only worker of fixtures/crashing-worker.mjs.
import { describe, it, expect, vi, afterAll } from "vitest";
import { request as httpRequest } from "node:http";
import type { AddressInfo } from "node:net";
import type { FastifyInstance } from "fastify";
import type { KernelTask } from "../../pipeline/kernels/kernel-types.js";

const seen = vi.hoisted(() => [] as { task: KernelTask; signal?: AbortSignal }[]);

vi.mock("../../pipeline/kernels/worker-pool.js", async (importOriginal) => {
  const original = await importOriginal<typeof import("../../pipeline/kernels/worker-pool.js")>();
  const { fileURLToPath } = await import("node:url");
  const filename = fileURLToPath(new URL("../fixtures/crashing-worker.mjs", import.meta.url));
  return {
    ...original,
    createWorkerPool: (threads: number, options: { memoryMb?: number } = {}) => {
      const pool = original.createWorkerPool(threads, { ...options, filename });
      return {
        ...pool,
        compute: (task: KernelTask, signal?: AbortSignal) => {
          seen.push({ task, signal });
          return pool.compute(task, signal);
        },
      };
    },
  };
});

const { buildApp } = await import("../../http/app.js");

function profileBody(radiusUm: number) {
  return { drops: { kind: "monodisperse", radiusUm }, angles: { fromDeg: 38, toDeg: 44, stepDeg: 0.5 }, spectral: { fromNm: 400, toNm: 420, stepNm: 20 }, method: "airy" };
}

async function newApp(): Promise<FastifyInstance> {
  const app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 1, maxEventLoopDelayMs: 600_000 } });
  await app.ready();
  return app;
}

async function until(condition: () => boolean, timeoutMs: number): Promise<boolean> {
  const end = Date.now() + timeoutMs;
  while (!condition() && Date.now() < end) await new Promise((resolve) => setTimeout(resolve, 20));
  return condition();
}

const tasksFor = (radiusUm: number) => seen.filter((s) => s.task.items.some((item) => Math.abs(item.radiusUm - radiusUm) < 1));

/** POST over a real socket on 127.0.0.1; resolves with the status and body, or never if the request is destroyed. */
function post(port: number, path: string, body: unknown) {
  const payload = JSON.stringify(body);
  let req!: ReturnType<typeof httpRequest>;
  const response = new Promise<{ status: number; body: string; at: number }>((resolve, reject) => {
    req = httpRequest({ host: "127.0.0.1", port, path, method: "POST", headers: { "content-type": "application/json", "content-length": Buffer.byteLength(payload) } }, (res) => {
      let text = "";
      res.setEncoding("utf8");
      res.on("data", (chunk: string) => (text += chunk));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, body: text, at: performance.now() }));
    });
    req.on("error", reject);
    req.end(payload);
  });
  return { req, response };
}

const apps: FastifyInstance[] = [];
afterAll(async () => {
  for (const app of apps) await app.close();
});

describe("HTTP: a crashing kernel worker", () => {
  it("gives a 500 with a requestId and no internals, and the next request is served", async () => {
    const app = await newApp();
    apps.push(app);
    for (const radiusUm of [112, 132]) {
      const res = await app.inject({ method: "POST", url: "/v1/profile", payload: profileBody(radiusUm) });
      expect(res.statusCode).toBe(500);
      const body = res.json() as Record<string, unknown>;
      expect(body.error).toBe("internal");
      expect(typeof body.requestId).toBe("string");
      expect(String(body.requestId).length).toBeGreaterThan(0);
      expect(Object.keys(body).sort()).toEqual(["error", "message", "requestId"]);
      expect(String(body.message)).not.toMatch(/secret|kernel\.js|line 42|exited|worker|\/|stack/i);
    }
    const ok = await app.inject({ method: "POST", url: "/v1/profile", payload: profileBody(20) });
    expect(ok.statusCode).toBe(200);
    expect((ok.json() as { xyz: number[][] }).xyz.length).toBe(13);
  });
});

describe("HTTP: a client that hangs up", () => {
  it("aborts its kernel task, and the freed worker serves the next request", async () => {
    const app = await newApp();
    apps.push(app);
    await app.listen({ host: "127.0.0.1", port: 0 });
    const { port } = app.server.address() as AddressInfo;
    const hanging = post(port, "/v1/profile", profileBody(172)); // the worker would sleep 60 s
    hanging.response.catch(() => undefined);
    expect(await until(() => tasksFor(172).length > 0, 5000)).toBe(true);
    hanging.req.destroy();
    expect(await until(() => tasksFor(172).every((s) => s.signal?.aborted === true), 3000)).toBe(true);
    // One worker thread: this answers only if the sleeping task was really stopped.
    const t0 = performance.now();
    const next = await post(port, "/v1/profile", profileBody(21)).response;
    expect(next.status).toBe(200);
    expect(performance.now() - t0).toBeLessThan(15_000);
  });
});

describe("HTTP: graceful shutdown", () => {
  it("app.close() waits for a request in flight, which gets its full answer", async () => {
    const app = await newApp();
    await app.listen({ host: "127.0.0.1", port: 0 });
    const { port } = app.server.address() as AddressInfo;
    const slow = post(port, "/v1/profile", profileBody(152)); // the worker answers after 0.7 s per wavelength
    expect(await until(() => tasksFor(152).length > 0, 5000)).toBe(true);
    const closed = app.close().then(() => performance.now());
    const answer = await slow.response;
    expect(answer.status, answer.body.slice(0, 300)).toBe(200);
    expect((JSON.parse(answer.body) as { xyz: number[][] }).xyz.length).toBe(13);
    expect(await closed).toBeGreaterThanOrEqual(answer.at);
  });
});
