// The service is a fastify plugin: an instance made elsewhere (another server, a test harness) gets every route,
// hook and handler by registering it, and buildApp() is only Fastify(appServerOptions) plus that registration.
import { describe, it, expect, afterAll } from "vitest";
import Fastify from "fastify";
import { antisolarApp, appServerOptions } from "../../http/app.js";
import { loadConfig } from "../../pipeline/config/config.js";

const config = { ...loadConfig({}), cacheDir: "", workers: 0, rateLimitPerMinute: 0, maxEventLoopDelayMs: 0 };
const host = Fastify(appServerOptions(config));
// A route of the host's own, registered beside the plugin.
host.get("/host-only", async () => ({ mine: true }));
await host.register(antisolarApp, { config });
afterAll(async () => host.close());

describe("the app plugin on a caller's instance", () => {
  it("serves the service's routes and its OpenAPI document", async () => {
    const health = await host.inject({ url: "/healthz" });
    expect(health.statusCode).toBe(200);
    expect(health.json()).toMatchObject({ status: "ok" });
    const openapi = (await host.inject({ url: "/openapi.json" })).json() as { paths: Record<string, unknown> };
    expect(Object.keys(openapi.paths)).toEqual(expect.arrayContaining(["/healthz", "/v1/profile", "/v1/jobs"]));
  });

  it("is not encapsulated: its security headers and error handlers apply to the host's routes too", async () => {
    const own = await host.inject({ url: "/host-only" });
    expect(own.json()).toEqual({ mine: true });
    expect(own.headers["x-content-type-options"]).toBe("nosniff");
    const missing = await host.inject({ url: "/nowhere" });
    expect(missing.statusCode).toBe(404);
    expect(missing.json()).toMatchObject({ error: "not-found" });
  });

  it("takes the body limit from the options the builder gives the instance", () => {
    expect(host.initialConfig.bodyLimit).toBe(config.bodyLimitBytes);
  });
});
