// What keeps the service safe on a network (http/plugins/hardening.ts), checked against the service's contract
// (README: configuration, error shape) and published practice for HTTP services: security headers (OWASP Secure Headers Project),
// CORS only when configured (Fetch standard, CORS protocol), 429 and 503 with Retry-After (RFC 6585 §4,
// RFC 9110 §15.6.4), a crashed kernel worker fails only its own request, and cancelled work stops.
import { describe, it, expect } from "vitest";
import { fileURLToPath } from "node:url";
import type { FastifyInstance, LightMyRequestResponse } from "fastify";
import { buildApp } from "../../http/app.js";
import type { Config } from "../../pipeline/config/config.js";
import { KernelService, type KernelCompute } from "../../pipeline/kernels/kernel-service.js";
import { createInlinePool, createWorkerPool } from "../../pipeline/kernels/worker-pool.js";
import { computeProfile } from "../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../schemas/profile.js";

const crashingWorker = fileURLToPath(new URL("../fixtures/crashing-worker.mjs", import.meta.url));

async function withApp<T>(config: Partial<Config>, run: (app: FastifyInstance) => Promise<T>): Promise<T> {
  const app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 0, ...config } });
  try {
    await app.ready();
    return await run(app);
  } finally {
    await app.close();
  }
}

function expectCommonErrorShape(res: LightMyRequestResponse, code: string): Record<string, unknown> {
  expect(String(res.headers["content-type"])).toMatch(/^application\/json/);
  const body = res.json() as Record<string, unknown>;
  expect(body.error).toBe(code);
  expect(typeof body.message).toBe("string");
  expect(typeof body.requestId).toBe("string");
  expect(String(body.requestId).length).toBeGreaterThan(0);
  for (const key of Object.keys(body)) expect(["error", "message", "field", "allowed", "requestId"]).toContain(key);
  return body;
}

// OWASP Secure Headers Project's recommended values for an API that is never framed.
const SECURITY_HEADERS: Record<string, string> = {
  "x-content-type-options": "nosniff",
  "x-frame-options": "DENY",
  "referrer-policy": "no-referrer",
  "cross-origin-opener-policy": "same-origin",
  "cross-origin-resource-policy": "same-origin",
};

/** A profile cheap enough for the inline pool (a few ms); one worker task per wavelength. */
function cheapProfile(radiusUm: number, toNm = 700) {
  return profileRequestSchema.parse({
    drops: { kind: "monodisperse", radiusUm },
    angles: { fromDeg: 38, toDeg: 44, stepDeg: 0.5 },
    spectral: { fromNm: 400, toNm, stepNm: 20 },
    method: "airy",
  });
}

describe("security headers", () => {
  it("API responses, errors and /docs carry the headers; /docs has a CSP without scripts", async () => {
    await withApp({}, async (app) => {
      const responses = [
        await app.inject({ method: "GET", url: "/healthz" }),
        await app.inject({ method: "GET", url: "/v1/water" }),
        await app.inject({ method: "POST", url: "/v1/scatter", payload: { radiusUm: -1 } }),
        await app.inject({ method: "GET", url: "/no-such-route" }),
        await app.inject({ method: "GET", url: "/openapi.json" }),
      ];
      expect(responses.map((r) => r.statusCode)).toEqual([200, 200, 400, 404, 200]);
      for (const res of responses) for (const [k, v] of Object.entries(SECURITY_HEADERS)) expect(res.headers[k], k).toBe(v);
      const docs = await app.inject({ method: "GET", url: "/docs" });
      expect(docs.statusCode).toBe(200);
      for (const [k, v] of Object.entries(SECURITY_HEADERS)) expect(docs.headers[k], k).toBe(v);
      const csp = String(docs.headers["content-security-policy"]);
      expect(csp).toContain("default-src 'none'");
      expect(csp).toContain("frame-ancestors 'none'");
      expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/);
      expect(docs.body).not.toMatch(/<script/i); // the CSP allows no script, so the page must need none
    });
  });
});

describe("CORS", () => {
  it("is off by default: no Access-Control-Allow-Origin for any origin, no preflight answer", async () => {
    await withApp({ corsOrigins: [] }, async (app) => {
      const res = await app.inject({ method: "GET", url: "/v1/water", headers: { origin: "https://elsewhere.example" } });
      expect(res.statusCode).toBe(200);
      expect(res.headers["access-control-allow-origin"]).toBeUndefined();
      const preflight = await app.inject({ method: "OPTIONS", url: "/v1/profile", headers: { origin: "https://elsewhere.example", "access-control-request-method": "POST" } });
      expect(preflight.headers["access-control-allow-origin"]).toBeUndefined();
    });
  });

  it("with CORS_ORIGINS it allows exactly the listed origins", async () => {
    await withApp({ corsOrigins: ["https://studio.example"] }, async (app) => {
      const allowed = await app.inject({ method: "GET", url: "/v1/water", headers: { origin: "https://studio.example" } });
      expect(allowed.headers["access-control-allow-origin"]).toBe("https://studio.example");
      const preflight = await app.inject({ method: "OPTIONS", url: "/v1/profile", headers: { origin: "https://studio.example", "access-control-request-method": "POST" } });
      expect(preflight.statusCode).toBe(204);
      expect(preflight.headers["access-control-allow-origin"]).toBe("https://studio.example");
      expect(String(preflight.headers["access-control-allow-methods"])).toContain("POST");
      const other = await app.inject({ method: "GET", url: "/v1/water", headers: { origin: "https://elsewhere.example" } });
      expect(other.headers["access-control-allow-origin"]).toBeUndefined();
    });
  });
});

describe("rate limit", () => {
  it("the request over the limit gets 429 in the common shape with Retry-After; /healthz still answers", async () => {
    await withApp({ rateLimitPerMinute: 3 }, async (app) => {
      for (let i = 0; i < 3; i++) expect((await app.inject({ method: "GET", url: "/v1/water" })).statusCode).toBe(200);
      const limited = await app.inject({ method: "GET", url: "/v1/water" });
      expect(limited.statusCode).toBe(429);
      expectCommonErrorShape(limited, "rate-limited");
      expect(Number(limited.headers["retry-after"])).toBeGreaterThan(0);
      expect((await app.inject({ method: "GET", url: "/healthz" })).statusCode).toBe(200);
    });
  });
});

describe("back-pressure", () => {
  it("over the memory limit requests get 503 with Retry-After; /healthz still answers", async () => {
    await withApp({ maxRssMb: 1 }, async (app) => {
      // @fastify/under-pressure samples memory once a second (its default sampleInterval).
      await new Promise((resolve) => setTimeout(resolve, 1200));
      const res = await app.inject({ method: "GET", url: "/v1/water" });
      expect(res.statusCode).toBe(503);
      expectCommonErrorShape(res, "overloaded");
      expect(Number(res.headers["retry-after"])).toBeGreaterThan(0);
      expect((await app.inject({ method: "GET", url: "/healthz" })).statusCode).toBe(200);
    });
  });

  it("after the event loop was blocked past the limit requests get 503; /healthz still answers", async () => {
    await withApp({ maxEventLoopDelayMs: 50 }, async (app) => {
      expect((await app.inject({ method: "GET", url: "/v1/water" })).statusCode).toBe(200);
      // Block the loop for longer than one sampling period (1 s), so that the next sample sees the delay.
      const until = Date.now() + 1300;
      while (Date.now() < until) {
        /* busy: this is the overload being simulated */
      }
      await new Promise((resolve) => setTimeout(resolve, 30));
      const res = await app.inject({ method: "GET", url: "/v1/water" });
      expect(res.statusCode).toBe(503);
      expectCommonErrorShape(res, "overloaded");
      expect(res.headers["retry-after"]).toBe("5");
      expect((await app.inject({ method: "GET", url: "/healthz" })).statusCode).toBe(200);
    });
  });
});

describe("kernel worker crashes", () => {
  it("a worker that throws or exits fails only its own request; the pool keeps serving with correct numbers", async () => {
    const pool = createWorkerPool(1, { filename: crashingWorker });
    try {
      const kernels = new KernelService({ memoryBudgetBytes: 2 ** 26, compute: pool.compute });
      const limits = { maxTermAngles: Infinity };
      await expect(computeProfile(cheapProfile(112, 420), { kernels, limits })).rejects.toThrow();
      await expect(computeProfile(cheapProfile(132, 420), { kernels, limits })).rejects.toThrow();
      const afterCrash = await computeProfile(cheapProfile(20), { kernels, limits });
      // Reference: the same request on the calling thread, without any worker.
      const inline = await computeProfile(cheapProfile(20), { kernels: new KernelService({ memoryBudgetBytes: 2 ** 26, compute: createInlinePool().compute }), limits });
      expect(Array.from(afterCrash.colour.xyz)).toEqual(Array.from(inline.colour.xyz));
      // The crashed rows were not cached as failures: asking again recomputes (and fails) rather than hanging.
      await expect(computeProfile(cheapProfile(132, 420), { kernels, limits })).rejects.toThrow();
      const again = await computeProfile(cheapProfile(25), { kernels, limits });
      expect(again.colour.xyz.length).toBeGreaterThan(0);
    } finally {
      await pool.close();
    }
  });
});

describe("concurrent requests that share kernel rows", () => {
  it("when both fail, the process sees no unhandled rejection (it would end a Node server)", async () => {
    const unhandled: unknown[] = [];
    const listener = (reason: unknown) => void unhandled.push(reason);
    process.on("unhandledRejection", listener);
    const pool = createWorkerPool(1, { filename: crashingWorker });
    try {
      const kernels = new KernelService({ memoryBudgetBytes: 2 ** 26, compute: pool.compute });
      const limits = { maxTermAngles: Infinity };
      // The second request borrows the first one's rows (400–460 nm) and computes its own (480–520 nm): all fail.
      const first = computeProfile(cheapProfile(113, 460), { kernels, limits });
      const second = computeProfile(cheapProfile(113, 520), { kernels, limits });
      await expect(first).rejects.toThrow();
      await expect(second).rejects.toThrow();
      await new Promise((resolve) => setTimeout(resolve, 500));
      expect(unhandled.map(String)).toEqual([]);
    } finally {
      process.off("unhandledRejection", listener);
      await pool.close();
    }
  });
});

describe("cancellation", () => {
  it("an aborted request stops its kernel work: the compute function sees the abort and the rows reject", async () => {
    const seen: AbortSignal[] = [];
    let started!: () => void;
    const computing = new Promise<void>((resolve) => (started = resolve));
    // Stands in for a long worker task: it ends only when its signal is aborted, as piscina's run({ signal }) does.
    const compute: KernelCompute = (_task, signal) =>
      new Promise((_resolve, reject) => {
        if (signal) seen.push(signal);
        started();
        signal?.addEventListener("abort", () => reject(signal.reason), { once: true });
      });
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 26, compute });
    const controller = new AbortController();
    const result = computeProfile(cheapProfile(40), { kernels, limits: { maxTermAngles: Infinity }, signal: controller.signal });
    await computing;
    controller.abort(new Error("client went away"));
    await expect(result).rejects.toThrow("client went away");
    expect(seen.length).toBeGreaterThan(0);
    expect(seen.every((s) => s.aborted)).toBe(true);
  });

  it("aborting stops a real worker task long before it would have finished", async () => {
    const pool = createWorkerPool(1, { filename: crashingWorker });
    try {
      const kernels = new KernelService({ memoryBudgetBytes: 2 ** 26, compute: pool.compute });
      const controller = new AbortController();
      const t0 = performance.now();
      const limits = { maxTermAngles: Infinity };
      const result = computeProfile(cheapProfile(172), { kernels, limits, signal: controller.signal });
      setTimeout(() => controller.abort(new Error("client went away")), 200);
      await expect(result).rejects.toThrow();
      // The task sleeps 60 s; the abort must end it within a few seconds (thread termination).
      expect(performance.now() - t0).toBeLessThan(5000);
      // The pool replaces the terminated thread and serves the next task.
      const next = await computeProfile(cheapProfile(20), { kernels, limits });
      expect((next.meta.kernel as { computed: number }).computed).toBeGreaterThan(0);
    } finally {
      await pool.close();
    }
  });
});
