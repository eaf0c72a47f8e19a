// Every JSON answer of every route, taken from the running app, must validate twice: against its zod schema in
// schemas/responses/ and against the JSON Schema that /openapi.json publishes for that route and status (checked
// with Ajv, a general-purpose JSON Schema 2020-12 validator, so the published document is tested, not just zod).
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import type { FastifyInstance, LightMyRequestResponse } from "fastify";
import { Ajv2020 } from "ajv/dist/2020.js";
import { buildApp } from "../../http/app.js";
import { toJsonSchema } from "../../http/openapi.js";
import { responseSchemas, type ResponseSchemaName } from "../../schemas/responses/catalogue.js";

interface Operation {
  responses: Record<string, { content?: Record<string, { schema?: { $ref?: string; oneOf?: { $ref: string }[] } }> }>;
}
interface OpenApi {
  paths: Record<string, Record<string, Operation>>;
  components: { schemas: Record<string, object> };
}

/** A small spectrum and few angles keep every render quick; the shapes are those of any request. */
const quick = { spectral: { fromNm: 400, toNm: 700, stepNm: 20 } };

// maxEventLoopDelayMs 0 turns the overload check off: a render blocking the loop longer than its sampling interval
// leaves it no samples, which it reads as overloaded, and this file is about shapes, not load.
let app: FastifyInstance;
let openapi: OpenApi;
const ajv = new Ajv2020({ strict: false, allErrors: true });
/** (OpenAPI path, method, status) of every answer checked, to prove every documented JSON answer was seen. */
const seen = new Set<string>();

beforeAll(async () => {
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 1, maxEventLoopDelayMs: 0, maxRssMb: 1_000_000 } });
  openapi = (await app.inject({ url: "/openapi.json" })).json() as OpenApi;
});
afterAll(async () => app.close());

function publishedSchema(path: string, method: string, status: number): { $ref?: string; oneOf?: { $ref: string }[] } {
  const op = openapi.paths[path]?.[method];
  const response = op?.responses[String(status)] ?? op?.responses.default;
  const schema = response?.content?.["application/json"]?.schema;
  if (!schema) throw new Error(`/openapi.json has no JSON schema for ${method.toUpperCase()} ${path} ${status}`);
  return schema;
}

/** Validates with Ajv against the published schema, resolving its $refs inside the served document. */
function publishedErrors(schema: object, value: unknown): string[] {
  const validate = ajv.compile({ ...schema, components: openapi.components });
  return validate(value) ? [] : (validate.errors ?? []).map((e) => `${e.instancePath} ${e.message}`);
}

/** Checks one real answer: status, the zod schema of its name, and the schema /openapi.json serves for it. */
function check(res: LightMyRequestResponse, path: string, method: string, status: number, name: ResponseSchemaName): unknown {
  expect(res.statusCode, res.body.slice(0, 300)).toBe(status);
  expect(res.headers["content-type"]).toMatch(/^application\/json/);
  const body = res.json();
  const zodResult = responseSchemas[name].safeParse(body);
  expect(zodResult.success, zodResult.success ? "" : JSON.stringify(zodResult.error.issues.slice(0, 3))).toBe(true);
  const published = publishedSchema(path, method, status);
  const refs = published.$ref ? [published.$ref] : (published.oneOf ?? []).map((s) => s.$ref);
  expect(refs).toContain(`#/components/schemas/${name}`);
  expect(publishedErrors(published, body)).toEqual([]);
  seen.add(`${method} ${path} ${status}`);
  return body;
}

describe("the published schemas are the zod schemas", () => {
  it("components.schemas holds each response schema of schemas/responses/ as JSON Schema", () => {
    for (const [name, schema] of Object.entries(responseSchemas)) {
      expect(openapi.components.schemas[name]).toEqual(toJsonSchema(schema, "output"));
    }
  });
});

describe("real answers validate against their schemas", () => {
  it("service: /healthz, /readyz", async () => {
    check(await app.inject({ url: "/healthz" }), "/healthz", "get", 200, "Health");
    check(await app.inject({ url: "/readyz" }), "/readyz", "get", 200, "Ready");
  });

  it("optics: /v1/water and /v1/scatter with every method", async () => {
    check(await app.inject({ url: "/v1/water?wavelengthNm=550&salinityPsu=35" }), "/v1/water", "get", 200, "Water");
    for (const body of [
      { radiusUm: 5, wavelengthNm: 550 },
      { radiusUm: 5, wavelengthNm: 550, method: "debye", debyeOrder: 3 },
      { radiusUm: 50, wavelengthNm: 550, method: "airy" },
      // Ray optics diverges at the bow angles: those samples are null, which the schema allows.
      { radiusUm: 50, wavelengthNm: 550, method: "geometric" },
      { radiusUm: 5, wavelengthNm: 550, refractiveIndex: { re: 1.33, im: 0.01 } },
    ]) {
      check(await app.inject({ method: "POST", url: "/v1/scatter", payload: body }), "/v1/scatter", "post", 200, "Scatter");
    }
  });

  it("bows: /v1/profile as JSON, /v1/presets and every preset", async () => {
    const body = { ...quick, angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.5 } };
    check(await app.inject({ method: "POST", url: "/v1/profile", payload: body }), "/v1/profile", "post", 200, "Profile");
    const monodisperse = { ...body, drops: { kind: "monodisperse", radiusUm: 20 }, output: { normalise: "physical", space: "acescg" } };
    check(await app.inject({ method: "POST", url: "/v1/profile", payload: monodisperse }), "/v1/profile", "post", 200, "Profile");
    const list = check(await app.inject({ url: "/v1/presets" }), "/v1/presets", "get", 200, "PresetList") as { presets: { name: string }[] };
    expect(list.presets.length).toBeGreaterThan(0);
    for (const { name } of list.presets) check(await app.inject({ url: `/v1/presets/${name}` }), "/v1/presets/{name}", "get", 200, "Preset");
  });

  it("a light given by moment and place, or the moon: sourcePosition and moonlight in meta and manifests", async () => {
    // The worked example of Reda & Andreas 2004 (NREL/TP-560-34302, Table A5.1): Golden, Colorado, 17 October 2003.
    const at = { utc: "2003-10-17T12:30:30-07:00", latitudeDeg: 39.742476, longitudeDeg: -105.1786, heightM: 1830.14, pressureHpa: 820, temperatureC: 11 };
    const moon = { elevationDeg: 10, phaseAngleDeg: 0 };
    const angles = { fromDeg: 36, toDeg: 56, stepDeg: 0.5 };
    const profiles = [
      check(await app.inject({ method: "POST", url: "/v1/profile", payload: { ...quick, angles, sun: { at } } }), "/v1/profile", "post", 200, "Profile"),
      check(await app.inject({ method: "POST", url: "/v1/profile", payload: { ...quick, angles, moon } }), "/v1/profile", "post", 200, "Profile"),
    ] as { meta: { sourcePosition?: unknown; moonlight?: unknown } }[];
    expect(profiles[0].meta.sourcePosition).toBeDefined();
    expect(profiles[1].meta.moonlight).toBeDefined();
    const lut = { sizes: { kind: "rain-rate", texels: 2 }, angles: { texels: 8 }, scenario: { ...quick, moon } };
    const manifest = check(await app.inject({ method: "POST", url: "/v1/lut?part=manifest", payload: lut }), "/v1/lut", "post", 200, "LutManifest") as { moonlight?: unknown };
    expect(manifest.moonlight).toBeDefined();
    const view = { sun: { at }, camera: { widthPx: 16, heightPx: 8 }, scenario: quick };
    const overlay = check(await app.inject({ method: "POST", url: "/v1/view?part=manifest", payload: view }), "/v1/view", "post", 200, "ViewManifest") as { sourcePosition?: unknown };
    expect(overlay.sourcePosition).toBeDefined();
  });

  it("textures: /v1/lut's manifest and JSON texture, both angle mappings and all row kinds", async () => {
    const bodies = [
      { sizes: { kind: "rain-rate", texels: 2 }, angles: { texels: 8 }, scenario: quick },
      { sizes: { kind: "radius", texels: 2, fromUm: 20, toUm: 400 }, angles: { texels: 8, mapping: "linear" }, scenario: quick, space: "xyz-d65" },
      { sizes: { kind: "none" }, angles: { texels: 8 }, scenario: quick },
      // A time-of-day texture: its manifest lists the slices, and its JSON holds slices instead of texels.
      { sizes: { kind: "none" }, angles: { texels: 8 }, scenario: quick, sunElevations: { fromDeg: 5, toDeg: 25, slices: 2 } },
    ];
    for (const body of bodies) {
      check(await app.inject({ method: "POST", url: "/v1/lut?part=manifest", payload: body }), "/v1/lut", "post", 200, "LutManifest");
      check(await app.inject({ method: "POST", url: "/v1/lut?format=json", payload: body }), "/v1/lut", "post", 200, "LutJson");
    }
    const layered = check(await app.inject({ method: "POST", url: "/v1/lut?part=manifest&layers=by-order", payload: bodies[0] }), "/v1/lut", "post", 200, "LutManifest") as { layers?: { kind: string } };
    expect(layered.layers?.kind).toBe("by-order");
  });

  it("images: /v1/view and /v1/sky manifests for every format", async () => {
    for (const format of ["exr", "png", "png16"]) {
      const view = { camera: { widthPx: 24, heightPx: 16, projection: "fisheye" }, polariserDeg: 20, scenario: quick };
      check(await app.inject({ method: "POST", url: `/v1/view?part=manifest&format=${format}`, payload: view }), "/v1/view", "post", 200, "ViewManifest");
      const sky = { widthPx: 32, heightPx: 16, scenario: quick };
      check(await app.inject({ method: "POST", url: `/v1/sky?part=manifest&format=${format}`, payload: sky }), "/v1/sky", "post", 200, "SkyManifest");
    }
    // hdr has no alpha: only the additive layer; its view looks away from the bows, so no pixel sees rain.
    const additive = { layer: "additive", camera: { widthPx: 16, heightPx: 8, yawDeg: 240, pitchDeg: 10 }, scenario: quick };
    check(await app.inject({ method: "POST", url: "/v1/view?part=manifest&format=hdr", payload: additive }), "/v1/view", "post", 200, "ViewManifest");
    // Layers by scattering order: the manifest's layers (channels of the multi-layer EXR).
    const layered = check(await app.inject({ method: "POST", url: "/v1/sky?part=manifest&format=exr&layers=by-order", payload: { widthPx: 32, heightPx: 16, scenario: { ...quick, method: "airy", drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 } } } }), "/v1/sky", "post", 200, "SkyManifest") as { layers?: { channels: string[] } };
    expect(layered.layers?.channels).toContain("primary.R");
  });

  it("jobs: submit, poll, every server-sent event, cancel", async () => {
    const submitted = check(
      await app.inject({ method: "POST", url: "/v1/jobs", payload: { endpoint: "profile", body: { ...quick, angles: { fromDeg: 38, toDeg: 44, stepDeg: 1 } } } }),
      "/v1/jobs",
      "post",
      202,
      "Job",
    ) as { id: string };
    const events = await app.inject({ url: `/v1/jobs/${submitted.id}/events` });
    expect(events.headers["content-type"]).toMatch(/^text\/event-stream/);
    const data = events.body.split("\n").filter((line) => line.startsWith("data: ")).map((line) => JSON.parse(line.slice(6)) as unknown);
    expect(data.length).toBeGreaterThan(0);
    // Each event's data is the job as GET /v1/jobs/:id gives it (the route's description says so).
    for (const event of data) {
      expect(responseSchemas.Job.safeParse(event).success).toBe(true);
      expect(publishedErrors(publishedSchema("/v1/jobs/{id}", "get", 200), event)).toEqual([]);
    }
    check(await app.inject({ url: `/v1/jobs/${submitted.id}` }), "/v1/jobs/{id}", "get", 200, "Job");
    check(await app.inject({ method: "DELETE", url: `/v1/jobs/${submitted.id}` }), "/v1/jobs/{id}", "delete", 200, "Job");
  });

  it("errors: 400, 404, 409, 415, 422 and an unknown route all have the one error shape", async () => {
    const error = (res: LightMyRequestResponse, path: string, method: string, status: number) => check(res, path, method, status, "Error");
    error(await app.inject({ method: "POST", url: "/v1/profile", payload: { angles: { fromDeg: -5 } } }), "/v1/profile", "post", 400);
    const layers = error(await app.inject({ method: "POST", url: "/v1/view?format=png&layers=by-order", payload: {} }), "/v1/view", "post", 400) as { field?: string; message: string };
    expect(layers.field).toBe("layers");
    expect(layers.message).toMatch(/format exr/);
    error(await app.inject({ url: "/v1/presets/nowhere" }), "/v1/presets/{name}", "get", 404);
    error(await app.inject({ url: "/v1/jobs/no-such-job" }), "/v1/jobs/{id}", "get", 404);
    error(await app.inject({ method: "POST", url: "/v1/scatter", payload: { radiusUm: 5000, wavelengthNm: 400, scatteringAngles: { fromDeg: 0, toDeg: 180, stepDeg: 0.01 } } }), "/v1/scatter", "post", 422);
    error(await app.inject({ method: "POST", url: "/v1/profile", headers: { "content-type": "text/plain" }, payload: "{}" }), "/v1/profile", "post", 415);
    const job = (await app.inject({ method: "POST", url: "/v1/jobs", payload: { endpoint: "profile", body: quick } })).json() as { id: string };
    // Not finished yet, or cancelled: 409 either way, unless the render was already done (then it is the profile).
    await app.inject({ method: "DELETE", url: `/v1/jobs/${job.id}` });
    const result = await app.inject({ url: `/v1/jobs/${job.id}/result` });
    if (result.statusCode === 200) expect(responseSchemas.Profile.safeParse(result.json()).success).toBe(true);
    else error(result, "/v1/jobs/{id}/result", "get", 409);
    const unknown = await app.inject({ url: "/v1/nothing-here" });
    expect(unknown.statusCode).toBe(404);
    expect(responseSchemas.Error.safeParse(unknown.json()).success).toBe(true);
  });

  it("every JSON answer /openapi.json documents was checked above", () => {
    const documented: string[] = [];
    for (const [path, methods] of Object.entries(openapi.paths)) {
      for (const [method, op] of Object.entries(methods)) {
        for (const [status, response] of Object.entries(op.responses)) {
          if (status !== "default" && Number(status) < 400 && response.content?.["application/json"]?.schema?.$ref) documented.push(`${method} ${path} ${status}`);
          if (status !== "default" && Number(status) < 400 && response.content?.["application/json"]?.schema?.oneOf) documented.push(`${method} ${path} ${status}`);
        }
      }
    }
    expect(documented.length).toBeGreaterThan(10);
    expect(documented.filter((key) => !seen.has(key))).toEqual([]);
  });
});

describe("the schemas are strict: a changed answer fails both checks", () => {
  it("a missing field, a field of another type and an unknown field are each refused", async () => {
    const res = await app.inject({ method: "POST", url: "/v1/profile", payload: { ...quick, angles: { fromDeg: 38, toDeg: 44, stepDeg: 1 } } });
    const good = res.json() as { meta: Record<string, unknown>; bows: Record<string, unknown> };
    const published = publishedSchema("/v1/profile", "post", 200);
    const variants = [
      { ...good, meta: { ...good.meta, hash: undefined } },
      { ...good, meta: { ...good.meta, computeMs: "12" } },
      { ...good, bows: { ...good.bows, primaryDeg: "41" } },
      { ...good, extra: true },
    ].map((v) => JSON.parse(JSON.stringify(v)) as unknown);
    for (const bad of variants) {
      expect(responseSchemas.Profile.safeParse(bad).success).toBe(false);
      expect(publishedErrors(published, bad).length).toBeGreaterThan(0);
    }
    expect(responseSchemas.Profile.safeParse(good).success).toBe(true);
  });
});
