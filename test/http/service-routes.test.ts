import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";

let app: FastifyInstance;
beforeAll(async () => {
  app = await buildApp();
  await app.ready();
});
afterAll(async () => app.close());

describe("service endpoints", () => {
  it("GET /healthz answers 200", async () => {
    const res = await request(app.server).get("/healthz");
    expect(res.status).toBe(200);
    expect(res.body.status).toBe("ok");
  });

  it("GET /openapi.json is an OpenAPI 3.1 document listing the routes", async () => {
    const res = await request(app.server).get("/openapi.json");
    expect(res.status).toBe(200);
    expect(res.body.openapi).toBe("3.1.0");
    expect(Object.keys(res.body.paths)).toContain("/healthz");
  });

  it("GET /docs is an HTML reference with the eye-safety caution", async () => {
    const res = await request(app.server).get("/docs");
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/text\/html/);
    expect(res.text).toMatch(/Eye safety/);
    expect(res.text).toContain("/healthz");
  });

  it("an unknown route is a 404 in the common error shape", async () => {
    const res = await request(app.server).get("/v1/nothing-here");
    expect(res.status).toBe(404);
    expect(res.body).toMatchObject({ error: "not-found" });
    expect(typeof res.body.requestId).toBe("string");
  });
});
