// Random valid and invalid requests through every endpoint (property-based, fast-check). The expectations are the
// service's own contract (README, Conventions; DEVELOPERS.md): a valid request gives 2xx with a
// well-formed file (or 422 when valid but too costly), an invalid one a 4xx in the one error shape that names the
// field at fault, and nothing gives a 5xx or hangs. File formats are checked against their published magic numbers:
// PNG (ISO/IEC 15948:2004 §5.2, via sharp's decoder), OpenEXR (magic 20000630, OpenEXR file layout spec),
// Radiance HDR ("#?RADIANCE" header, Ward 1991, Graphics Gems II "Real pixels").
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import fc from "fast-check";
import sharp from "sharp";
import { z } from "zod";
import type { FastifyInstance, LightMyRequestResponse } from "fastify";
import { buildApp } from "../../http/app.js";
import { scatterRequestSchema } from "../../schemas/scatter.js";
import { profileRequestSchema } from "../../schemas/profile.js";
import { lutRequestSchema } from "../../schemas/lut.js";
import { skyRequestSchema, viewRequestSchema } from "../../schemas/view.js";
import { sizeMapRequestSchema } from "../../schemas/figures.js";
import type { JsonSchemaNode } from "../../schemas/json-schema.js";

/** A request that has not answered in this time counts as hung; the slowest valid request here takes well under 5 s. */
const REQUEST_TIMEOUT_MS = 20_000;
/** Runs per endpoint and class: small enough for the suite to stay under ~90 s on 2 cores. PROPERTY_RUNS scales them. */
const RUN_SCALE = Number(process.env.PROPERTY_RUNS ?? 20) / 20;
// A fixed seed keeps CI reproducible: a rare case found once must not fail an unrelated change later. To search new
// cases, run with PROPERTY_SEED=random (and PROPERTY_RUNS=200, say); fast-check prints the seed of any failure.
const SEED = process.env.PROPERTY_SEED === "random" ? undefined : Number(process.env.PROPERTY_SEED ?? 20261202);
if (SEED !== undefined) fc.configureGlobal({ seed: SEED });
const runs = (n: number) => Math.max(1, Math.round(n * RUN_SCALE));

let app: FastifyInstance;
let paths: Set<string>;

beforeAll(async () => {
  // Back-pressure is tested in hardening.test.ts; here a busy test machine must not turn answers into 503s. 0 turns
  // the event-loop check off: a high limit is not enough, as under-pressure reads a sampling interval without a
  // single sample (a starved loop on a loaded machine) as an infinite delay.
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 2, maxEventLoopDelayMs: 0, maxRssMb: 1_000_000 } });
  await app.ready();
  const openapi = (await app.inject({ method: "GET", url: "/openapi.json" })).json() as { paths: Record<string, unknown> };
  paths = new Set(Object.keys(openapi.paths));
});
afterAll(async () => app?.close());

interface Sent {
  method: "GET" | "POST";
  url: string;
  payload?: string;
  headers?: Record<string, string>;
}

async function send(req: Sent): Promise<LightMyRequestResponse> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`hung: ${req.method} ${req.url} ${req.payload?.slice(0, 300)}`)), REQUEST_TIMEOUT_MS);
  });
  try {
    return await Promise.race([
      app.inject({
        method: req.method,
        url: req.url,
        payload: req.payload,
        headers: req.payload !== undefined ? { "content-type": "application/json", ...req.headers } : req.headers,
      }),
      timeout,
    ]);
  } finally {
    clearTimeout(timer);
  }
}

function describeRequest(req: Sent, res: LightMyRequestResponse): string {
  return `${req.method} ${req.url} ${req.payload?.slice(0, 400) ?? ""} → ${res.statusCode} ${res.body.slice(0, 300)}`;
}

/** Fields where null is an answer: no bow found in the angle range; no polariser; no angle of the layer in view;
 * no alpha in an additive layer. */
const NULL_MEANS_NONE = /(^|\.)(bows\.primaryDeg|bows\.secondaryDeg|polariser|seenAnglesDeg|layer\.alpha)$/;

/** Paths of every unexpected null in a JSON value: JSON.stringify writes NaN and ±Infinity as null. */
function nullPaths(value: unknown, path = ""): string[] {
  if (value === null) return NULL_MEANS_NONE.test(path) ? [] : [path];
  if (Array.isArray(value)) return value.flatMap((v, i) => nullPaths(v, `${path}[${i}]`));
  if (typeof value === "object") return Object.entries(value as object).flatMap(([k, v]) => nullPaths(v, path ? `${path}.${k}` : k));
  return [];
}

/** Checks a 2xx answer: JSON without NaN/Infinity (null), or a file whose bytes are what its Content-Type says. */
async function expectWellFormed(req: Sent, res: LightMyRequestResponse): Promise<void> {
  const type = String(res.headers["content-type"] ?? "");
  const body = res.rawPayload;
  const what = describeRequest(req, res);
  expect(body.length, what).toBeGreaterThan(0);
  if (type.startsWith("application/json")) {
    const value = JSON.parse(res.body) as { xyz?: number[][] };
    // Chromaticity is 0/0 where there is no light at all (X = Y = Z = 0, e.g. zero drops per m³): null there only.
    const black = (path: string) => {
      const m = /^chromaticity\[(\d+)\]\[\d\]$/.exec(path);
      return m !== null && value.xyz?.[Number(m[1])]?.every((v) => v === 0) === true;
    };
    expect(nullPaths(value).filter((p) => !black(p)), what).toEqual([]);
  } else if (type.startsWith("image/png")) {
    const meta = await sharp(body).metadata();
    expect(meta.format, what).toBe("png");
    expect(meta.width, what).toBeGreaterThan(0);
    const stats = await sharp(body).stats();
    for (const c of stats.channels) expect(Number.isFinite(c.mean), what).toBe(true);
  } else if (type.startsWith("image/x-exr")) {
    expect(body.readUInt32LE(0), what).toBe(20000630);
  } else if (type.startsWith("image/vnd.radiance")) {
    expect(body.subarray(0, 10).toString("latin1"), what).toBe("#?RADIANCE");
  } else if (type.startsWith("image/svg+xml")) {
    const text = res.body;
    expect(text, what).toMatch(/^(<\?xml[^>]*\?>\s*)?<svg[\s>]/);
    expect(text.trimEnd().endsWith("</svg>"), what).toBe(true);
    expect(text, what).not.toMatch(/NaN|Infinity|undefined/);
  } else if (type.startsWith("text/html") || type.startsWith("text/plain")) {
    expect(res.body.length, what).toBeGreaterThan(0);
  } else {
    throw new Error(`unexpected content type '${type}': ${what}`);
  }
}

const ERROR_KEYS = new Set(["error", "message", "field", "allowed", "requestId", "cost", "limit", "jobs"]);

/** The one error shape the README documents: { error, message, field, allowed, requestId }. */
function expectErrorShape(req: Sent, res: LightMyRequestResponse): { error: string; message: string; field?: string } {
  const what = describeRequest(req, res);
  expect(String(res.headers["content-type"]), what).toMatch(/^application\/json/);
  const body = res.json() as Record<string, unknown>;
  for (const key of Object.keys(body)) expect(ERROR_KEYS.has(key), `${what}: unexpected key ${key}`).toBe(true);
  expect(typeof body.error, what).toBe("string");
  expect(typeof body.message, what).toBe("string");
  expect(String(body.message).length, what).toBeGreaterThan(0);
  expect(typeof body.requestId, what).toBe("string");
  expect(String(body.requestId).length, what).toBeGreaterThan(0);
  if (body.field !== undefined) expect(typeof body.field, what).toBe("string");
  if (body.allowed !== undefined) expect(typeof body.allowed, what).toBe("string");
  return body as { error: string; message: string; field?: string };
}

async function expectValidOutcome(req: Sent): Promise<void> {
  const res = await send(req);
  const what = describeRequest(req, res);
  if (res.statusCode === 422) {
    expect(expectErrorShape(req, res).error, what).toBe("too-costly");
    return;
  }
  expect(res.statusCode, what).toBeGreaterThanOrEqual(200);
  expect(res.statusCode, what).toBeLessThan(300);
  await expectWellFormed(req, res);
}

async function expectClientError(req: Sent, status: number, field?: string | string[]): Promise<void> {
  const res = await send(req);
  const what = describeRequest(req, res);
  expect(res.statusCode, what).toBe(status);
  const body = expectErrorShape(req, res);
  if (field !== undefined) expect(Array.isArray(field) ? field : [field], what).toContain(body.field);
}

// ---------- valid bodies: cheap by construction (few wavelengths, narrow angle ranges, tiny images) ----------

const spectral = fc
  .record({ fromNm: fc.constantFrom(380, 400, 420), count: fc.integer({ min: 4, max: 16 }) })
  .map(({ fromNm, count }) => ({ fromNm, toNm: fromNm + 20 * count, stepNm: 20 }));
const water = fc.record({ temperatureC: fc.double({ min: -10, max: 100, noNaN: true }), salinityPsu: fc.constant(0) });
const angles = fc
  .record({ fromDeg: fc.double({ min: 30, max: 50, noNaN: true }), spanDeg: fc.double({ min: 0, max: 10, noNaN: true }), stepDeg: fc.double({ min: 0.1, max: 1, noNaN: true }) })
  .map(({ fromDeg, spanDeg, stepDeg }) => ({ fromDeg, toDeg: fromDeg + spanDeg, stepDeg }));
const drops = fc.oneof(
  fc.record({ kind: fc.constant("monodisperse"), radiusUm: fc.double({ min: 5, max: 1500, noNaN: true }), numberPerM3: fc.double({ min: 0, max: 1e6, noNaN: true }) }),
  fc.record({ kind: fc.constant("marshall-palmer"), rainRateMmPerH: fc.double({ min: 0.1, max: 150, noNaN: true }) }),
  fc.record({ kind: fc.constant("gamma"), medianVolumeDiameterMm: fc.double({ min: 0.1, max: 6, noNaN: true }), mu: fc.double({ min: -0.99, max: 20, noNaN: true }), totalNumberPerM3: fc.double({ min: 1, max: 1e6, noNaN: true }) }),
  fc.record({ kind: fc.constant("lognormal"), medianRadiusUm: fc.double({ min: 5, max: 1000, noNaN: true }), geometricSd: fc.double({ min: 1.01, max: 2, noNaN: true }), totalNumberPerM3: fc.double({ min: 1, max: 1e8, noNaN: true }) }),
  fc
    .uniqueArray(fc.integer({ min: 5, max: 2000 }), { minLength: 1, maxLength: 6 })
    .chain((radii) => fc.tuple(fc.constant(radii.sort((a, b) => a - b)), fc.array(fc.double({ min: 0, max: 1e5, noNaN: true }), { minLength: radii.length, maxLength: radii.length })))
    .map(([radii, counts]) => ({ kind: "histogram", bins: radii.map((radiusUm, i) => ({ radiusUm, numberPerM3: counts[i] })) })),
);
const spectrum = fc.oneof(
  fc.record({ kind: fc.constant("astm-g173"), column: fc.constantFrom("extraterrestrial", "global-tilt", "direct-circumsolar") }),
  fc.record({ kind: fc.constant("blackbody"), temperatureK: fc.double({ min: 1000, max: 50000, noNaN: true }) }),
  fc.record({ kind: fc.constant("cie-d65") }),
  fc.record({ kind: fc.constant("cie-daylight"), cctK: fc.double({ min: 4000, max: 25000, noNaN: true }) }),
  fc.integer({ min: 2, max: 40 }).map((n) => ({
    kind: "table",
    wavelengthsNm: Array.from({ length: n }, (_, i) => 300 + (600 * i) / (n - 1)),
    values: Array.from({ length: n }, (_, i) => 1 + i),
  })),
);
const sun = fc.record({
  spectrum,
  elevationDeg: fc.double({ min: -1, max: 60, noNaN: true }),
  atmosphere: fc.record({ attenuate: fc.constantFrom("auto", "always", "never"), pressureHpa: fc.double({ min: 300, max: 1100, noNaN: true }), angstromBeta: fc.double({ min: 0, max: 2, noNaN: true }), angstromAlpha: fc.double({ min: 0, max: 4, noNaN: true }) }),
  discDeg: fc.double({ min: 0, max: 5, noNaN: true }),
  limbDarkening: fc.constantFrom("neckel-labs-1994", "uniform"),
});
const output = fc.record({
  space: fc.constantFrom("xyz-d65", "srgb-linear", "srgb", "display-p3", "rec2020", "acescg"),
  gamut: fc.constantFrom("clip", "css4", "desaturate"),
  normalise: fc.constantFrom("peak", "physical"),
  white: fc.constantFrom("sun", "absolute"),
});
const profileBody = fc.record(
  {
    drops,
    water,
    sun,
    observer: fc.constantFrom("cie1931-2", "cie1964-10"),
    angles,
    spectral,
    method: fc.constantFrom("auto", "airy", "geometric", "mie"),
    // Up to 256: denser averages multiply the Mie work of large drops, and the guard's 422 is a valid outcome anyway.
    mieSizesPerDecade: fc.constantFrom("auto", 64, 128, 256),
    polariserDeg: fc.double({ min: -180, max: 180, noNaN: true }),
    pathLengthM: fc.double({ min: 1, max: 100000, noNaN: true }),
    output,
  },
  { requiredKeys: ["drops", "angles", "spectral", "method"] },
);
const scatterBody = fc
  .record({
    radiusUm: fc.double({ min: 0.5, max: 100, noNaN: true }),
    wavelengthNm: fc.double({ min: 400, max: 700, noNaN: true }),
    water: fc.option(water, { nil: undefined }),
    scatteringAngles: fc
      .record({ fromDeg: fc.double({ min: 0, max: 170, noNaN: true }), spanDeg: fc.double({ min: 0, max: 10, noNaN: true }), stepDeg: fc.double({ min: 0.05, max: 2, noNaN: true }) })
      .map(({ fromDeg, spanDeg, stepDeg }) => ({ fromDeg, toDeg: fromDeg + spanDeg, stepDeg })),
    method: fc.constantFrom("mie", "debye", "airy", "geometric"),
    order: fc.integer({ min: 2, max: 6 }),
  })
  // Ray optics truly diverges at the forward glory (Θ = 0 for p = 4) and answers null there with a warning
  // (POST /v1/scatter's meta), so angles within 1e-3° of it are left out of the "no null" check.
  .filter((b) => !(b.method === "geometric" && b.scatteringAngles.fromDeg < 1e-3))
  .map(({ method, order, water, ...rest }) => ({
    ...rest,
    ...(water ? { water } : {}),
    method,
    ...(method === "debye" ? { debyeOrder: order } : {}),
    ...(method === "airy" || method === "geometric" ? { orders: [order] } : {}),
  }));
const scenario = fc.record({ drops, water, sun: sun.map(({ elevationDeg: _e, ...s }) => s), spectral, method: fc.constantFrom("auto", "airy", "geometric"), pathLengthM: fc.double({ min: 1, max: 100000, noNaN: true }) });
const lutBody = fc.record({
  scenario: fc.record({ spectral, method: fc.constantFrom("auto", "airy", "geometric"), water }, { requiredKeys: ["spectral"] }),
  angles: fc
    .record({ fromDeg: fc.double({ min: 30, max: 45, noNaN: true }), spanDeg: fc.double({ min: 1, max: 15, noNaN: true }), texels: fc.integer({ min: 2, max: 16 }), mapping: fc.constantFrom("linear", "bow-weighted") })
    .map(({ fromDeg, spanDeg, texels, mapping }) => ({ fromDeg, toDeg: fromDeg + spanDeg, texels, mapping })),
  sizes: fc.oneof(
    fc.record({ kind: fc.constant("radius"), fromUm: fc.double({ min: 50, max: 500, noNaN: true }), toUm: fc.double({ min: 600, max: 2000, noNaN: true }), texels: fc.integer({ min: 1, max: 2 }), liquidWaterGPerM3: fc.double({ min: 1e-6, max: 10, noNaN: true }) }),
    fc.record({ kind: fc.constant("rain-rate"), fromMmPerH: fc.double({ min: 0.1, max: 10, noNaN: true }), toMmPerH: fc.double({ min: 20, max: 150, noNaN: true }), texels: fc.integer({ min: 1, max: 2 }) }),
    fc.record({ kind: fc.constant("none") }),
  ),
  space: fc.constantFrom("acescg", "srgb-linear", "xyz-d65"),
});
const viewOutput = fc.record({ space: fc.constantFrom("srgb-linear", "acescg", "xyz-d65"), gamut: fc.constantFrom("clip", "css4", "desaturate"), white: fc.constantFrom("sun", "absolute"), normalise: fc.constantFrom("peak", "physical"), referenceCdPerM2: fc.double({ min: 1e-3, max: 1e6, noNaN: true }) });
const sunPosition = fc.record({ azimuthDeg: fc.double({ min: -360, max: 360, noNaN: true }), elevationDeg: fc.double({ min: -1, max: 60, noNaN: true }) });
const viewBody = fc.record(
  {
    scenario,
    camera: fc.record({
      projection: fc.constantFrom("rectilinear", "fisheye"),
      horizontalFovDeg: fc.double({ min: 10, max: 170, noNaN: true }),
      widthPx: fc.integer({ min: 1, max: 64 }),
      heightPx: fc.integer({ min: 1, max: 64 }),
      pitchDeg: fc.double({ min: -90, max: 90, noNaN: true }),
      rollDeg: fc.double({ min: -180, max: 180, noNaN: true }),
    }),
    sun: sunPosition,
    ground: fc.boolean(),
    layer: fc.constantFrom("premultiplied", "additive"),
    polariserDeg: fc.double({ min: -180, max: 180, noNaN: true }),
    maxAngleDeg: fc.double({ min: 1, max: 180, noNaN: true }),
    output: viewOutput,
  },
  { requiredKeys: ["scenario", "camera"] },
);
const skyBody = fc.record(
  {
    scenario,
    heightPx: fc.integer({ min: 1, max: 32 }),
    sun: sunPosition,
    ground: fc.boolean(),
    layer: fc.constantFrom("premultiplied", "additive"),
    maxAngleDeg: fc.double({ min: 1, max: 180, noNaN: true }),
    output: viewOutput,
  },
  { requiredKeys: ["scenario", "heightPx"] },
).map((b) => ({ ...b, widthPx: 2 * (b.heightPx as number) }));
const sizeMapBody = fc.record({
  radiusFromUm: fc.double({ min: 10, max: 200, noNaN: true }),
  radiusToUm: fc.double({ min: 300, max: 2000, noNaN: true }),
  radiusSteps: fc.integer({ min: 2, max: 4 }),
  water,
  sun,
  angles,
  spectral,
  method: fc.constantFrom("auto", "airy", "geometric"),
});

interface PostEndpoint {
  url: string;
  schema: z.ZodType;
  body: fc.Arbitrary<Record<string, unknown>>;
  formats: string[];
  /** Runs of the valid-request property, when fewer than the usual 20 keep a slow endpoint within the time budget. */
  runs?: number;
  /** Cross-field rules between the query and the body. */
  fit?: (body: Record<string, unknown>, query: string) => Record<string, unknown>;
}

/** Radiance HDR has no alpha channel, so it needs the additive layer. */
const hdrNeedsAdditive = (body: Record<string, unknown>, query: string) => (query.includes("format=hdr") ? { ...body, layer: "additive" } : body);

const postEndpoints: PostEndpoint[] = [
  { url: "/v1/scatter", schema: scatterRequestSchema, body: scatterBody, formats: [""] },
  { url: "/v1/profile", schema: profileRequestSchema, body: profileBody, formats: ["", "?format=json", "?format=png", "?format=png16&height=3"] },
  { url: "/v1/lut", schema: lutRequestSchema, body: lutBody, formats: ["?format=exr", "?format=hdr", "?format=png16", "?format=json", "?part=manifest", "?format=exr&pixelType=float"] },
  { url: "/v1/view", schema: viewRequestSchema, body: viewBody, formats: ["?format=exr", "?format=hdr", "?format=png16", "?format=png", "?part=manifest"], fit: hdrNeedsAdditive },
  { url: "/v1/sky", schema: skyRequestSchema, body: skyBody, formats: ["?format=exr", "?format=hdr", "?format=png16", "?format=png", "?part=manifest"], fit: hdrNeedsAdditive },
  { url: "/v1/figure/chromaticity", schema: profileRequestSchema, body: profileBody, formats: ["", "?format=svg"], runs: 10 },
  { url: "/v1/figure/size-map", schema: sizeMapRequestSchema, body: sizeMapBody, formats: ["", "?format=svg", "?format=png"], runs: 10 },
];

// ---------- invalid bodies: one field of a valid body made wrong, found through the schema's JSON Schema ----------

type JsonSchema = JsonSchemaNode;

/** Numbers that JSON text can carry but a double cannot: JSON.parse turns them into ±Infinity. */
const INF = "@@1e400@@";
const NEG_INF = "@@-1e400@@";
function toJsonText(body: unknown): string {
  return JSON.stringify(body).replaceAll(`"${INF}"`, "1e400").replaceAll(`"${NEG_INF}"`, "-1e400");
}

function branch(node: JsonSchema, value: unknown): JsonSchema {
  const options = node.anyOf ?? node.oneOf;
  if (!options) return node;
  const kind = value && typeof value === "object" ? (value as { kind?: unknown }).kind : undefined;
  return options.find((o) => o.properties?.kind?.const === kind) ?? options.find((o) => o.type !== "null") ?? node;
}

interface Leaf {
  path: (string | number)[];
  node: JsonSchema;
}

/** Every scalar in a body with the schema node that governs it; `kind` discriminators are left alone. */
function leaves(node: JsonSchema, value: unknown, path: (string | number)[] = []): Leaf[] {
  const n = branch(node, value);
  if (Array.isArray(value)) return n.items ? value.flatMap((v, i) => leaves(n.items!, v, [...path, i])) : [];
  if (value && typeof value === "object") {
    return Object.entries(value).flatMap(([k, v]) => (k === "kind" || !n.properties?.[k] ? [] : leaves(n.properties[k], v, [...path, k])));
  }
  return [{ path, node: n }];
}

function objectPaths(value: unknown, path: (string | number)[] = []): (string | number)[][] {
  if (Array.isArray(value)) return value.flatMap((v, i) => objectPaths(v, [...path, i]));
  if (value && typeof value === "object") return [path, ...Object.entries(value).flatMap(([k, v]) => objectPaths(v, [...path, k]))];
  return [];
}

function formatPath(path: (string | number)[]): string {
  let out = "";
  for (const key of path) out += typeof key === "number" ? `[${key}]` : out ? `.${key}` : key;
  return out;
}

/** Values that break one scalar field: outside its range, ±Infinity, NaN as text, or of the wrong type. */
function badValues(node: JsonSchema): unknown[] {
  const bad: unknown[] = ["NaN", "Infinity", null, {}, [], "12"];
  const type = Array.isArray(node.type) ? node.type[0] : node.type;
  if (type === "number" || type === "integer") {
    bad.push(INF, NEG_INF, true);
    const lo = node.minimum ?? node.exclusiveMinimum;
    const hi = node.maximum ?? node.exclusiveMaximum;
    if (lo !== undefined) bad.push(node.exclusiveMinimum !== undefined ? lo : lo - Math.max(1, Math.abs(lo)), -1e300);
    if (hi !== undefined) bad.push(node.exclusiveMaximum !== undefined ? hi : hi + Math.max(1, Math.abs(hi)), 1e300);
    if (type === "integer" && lo !== undefined && hi !== undefined && lo + 0.5 < hi) bad.push(lo + 0.5);
  } else if (node.enum) {
    bad.push("not-one-of-the-choices", 7);
  } else if (type === "boolean") {
    bad.push("yes", 1);
  }
  return bad;
}

function setAt(body: unknown, path: (string | number)[], value: unknown): unknown {
  if (path.length === 0) return value;
  const copy = (Array.isArray(body) ? [...body] : { ...(body as object) }) as Record<string | number, unknown>;
  copy[path[0]] = setAt(copy[path[0]], path.slice(1), value);
  return copy;
}

function getAt(body: unknown, path: (string | number)[]): unknown {
  return path.reduce<unknown>((v, k) => (v as Record<string | number, unknown>)[k], body);
}

const jsonSchemas = new Map<z.ZodType, JsonSchema>();
function jsonSchemaOf(schema: z.ZodType): JsonSchema {
  let js = jsonSchemas.get(schema);
  if (!js) jsonSchemas.set(schema, (js = z.toJSONSchema(schema, { io: "input", unrepresentable: "any" }) as JsonSchema));
  return js;
}

function present(url: string): boolean {
  return paths.has(url);
}

describe("property: valid requests give 2xx with well-formed output (or 422), never 5xx", () => {
  it("every POST endpoint in the OpenAPI document has a generator here (jobs aside)", () => {
    const covered = new Set(postEndpoints.map((e) => e.url));
    for (const url of ["/v1/scatter", "/v1/profile", "/v1/lut", "/v1/view", "/v1/sky"]) expect(paths.has(url), url).toBe(true);
    const openapiPosts = [...paths].filter((p) => p.startsWith("/v1/") && !p.startsWith("/v1/jobs") && !p.includes("{") && !p.startsWith("/v1/presets") && !p.startsWith("/v1/water") && !p.startsWith("/v1/lut/shader"));
    for (const p of openapiPosts) expect(covered.has(p), `${p} has no generator`).toBe(true);
  });

  for (const endpoint of postEndpoints) {
    // Each valid request may compute cold kernels: on a loaded 2-core machine 20 of them can take a minute or two.
    it(`POST ${endpoint.url}`, { timeout: 240_000 * Math.max(1, RUN_SCALE) }, async () => {
      if (!present(endpoint.url)) return expect(paths.has(endpoint.url)).toBe(false);
      await fc.assert(
        fc.asyncProperty(endpoint.body, fc.constantFrom(...endpoint.formats), async (generated, query) => {
          const body = endpoint.fit ? endpoint.fit(generated, query) : generated;
          // The generators must only make bodies that the schema itself accepts.
          const parsed = endpoint.schema.safeParse(body);
          expect(parsed.success, `${JSON.stringify(body)}: ${parsed.success ? "" : JSON.stringify(parsed.error.issues[0])}`).toBe(true);
          await expectValidOutcome({ method: "POST", url: endpoint.url + query, payload: JSON.stringify(body) });
        }),
        { numRuns: runs(endpoint.runs ?? 20) },
      );
    });
  }

  it("GET endpoints with random valid queries", async () => {
    const presets = ((await send({ method: "GET", url: "/v1/presets" })).json() as { presets: { name: string }[] }).presets.map((p) => p.name);
    expect(presets.length).toBeGreaterThan(0);
    const water = fc
      .record({ wavelengthNm: fc.double({ min: 200, max: 1100, noNaN: true }), temperatureC: fc.double({ min: -10, max: 100, noNaN: true }), salty: fc.boolean(), salinityPsu: fc.double({ min: 0, max: 35, noNaN: true }) })
      .map(({ wavelengthNm, temperatureC, salty, salinityPsu }) =>
        salty ? `/v1/water?wavelengthNm=${400 + ((wavelengthNm - 200) / 900) * 300}&temperatureC=${temperatureC}&salinityPsu=${salinityPsu}` : `/v1/water?wavelengthNm=${wavelengthNm}&temperatureC=${temperatureC}`,
      );
    const url = fc.oneof(
      water,
      fc.constantFrom(...presets).map((p) => `/v1/presets/${encodeURIComponent(p)}`),
      fc.constantFrom("/healthz", "/openapi.json", "/docs", "/", "/v1/presets", "/v1/lut/shader", "/v1/lut/shader?lang=hlsl", "/v1/lut/shader?lang=wgsl"),
    );
    await fc.assert(fc.asyncProperty(url, async (u) => expectValidOutcome({ method: "GET", url: u })), { numRuns: runs(40) });
  });
});

describe("property: invalid requests give 4xx in the common error shape naming the field, never 5xx", () => {
  for (const endpoint of postEndpoints) {
    it(`POST ${endpoint.url}: one field out of range, of the wrong type, or unknown`, async () => {
      if (!present(endpoint.url)) return expect(paths.has(endpoint.url)).toBe(false);
      const root = jsonSchemaOf(endpoint.schema);
      const mutated = endpoint.body.chain((body) => {
        const scalar = fc.constantFrom(...leaves(root, body)).chain((leaf) =>
          fc.constantFrom(...badValues(leaf.node)).map((bad) => ({ body: setAt(body, leaf.path, bad), field: formatPath(leaf.path) })),
        );
        const unknown = fc
          .tuple(fc.constantFrom(...objectPaths(body)), fc.constantFrom("colour", "radiusUM", "__extra", "stepdeg"))
          .filter(([path, key]) => !Object.hasOwn(getAt(body, path) as object, key))
          .map(([path, key]) => ({ body: setAt(body, path, { ...(getAt(body, path) as object), [key]: 1 }), field: formatPath([...path, key]) }));
        return fc.oneof(scalar, unknown);
      });
      await fc.assert(
        fc.asyncProperty(mutated, async ({ body, field }) => {
          await expectClientError({ method: "POST", url: endpoint.url, payload: toJsonText(body) }, 400, field);
        }),
        { numRuns: runs(20) },
      );
    });
  }

  it("malformed JSON and prototype-pollution keys give 400 invalid-json or invalid-request", async () => {
    const texts = fc.oneof(
      fc.string({ maxLength: 40 }).filter((s) => {
        try {
          const v = JSON.parse(s) as unknown;
          return v === null || typeof v !== "object" || Array.isArray(v);
        } catch {
          return s.trim() !== "";
        }
      }),
      profileBody.map((b) => JSON.stringify(b)).chain((t) => fc.integer({ min: 1, max: t.length - 1 }).map((n) => t.slice(0, n))),
      fc.constantFrom('{"__proto__": {"polluted": 1}}', '{"constructor": {"prototype": {"polluted": 1}}}', "{'drops': 1}", '{"drops": NaN}', '{"angles": {"fromDeg": Infinity}}', "[]", "42", '"text"'),
    );
    await fc.assert(
      fc.asyncProperty(texts, fc.constantFrom(...postEndpoints.filter((e) => present(e.url)).map((e) => e.url)), async (payload, url) => {
        const req: Sent = { method: "POST", url, payload };
        const res = await send(req);
        expect(res.statusCode, describeRequest(req, res)).toBe(400);
        expect(["invalid-json", "invalid-request"], describeRequest(req, res)).toContain(expectErrorShape(req, res).error);
      }),
      { numRuns: runs(40) },
    );
    expect(({} as { polluted?: number }).polluted).toBeUndefined();
  });

  it("wrong content types give 415", async () => {
    const contentTypes = fc.constantFrom("text/plain", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x", "application/xml", "image/png", "application/octet-stream");
    await fc.assert(
      fc.asyncProperty(contentTypes, fc.constantFrom(...postEndpoints.filter((e) => present(e.url)).map((e) => e.url)), async (type, url) => {
        const req: Sent = { method: "POST", url, payload: "{}", headers: { "content-type": type } };
        const res = await send(req);
        expect(res.statusCode, describeRequest(req, res)).toBe(415);
        expect(expectErrorShape(req, res).error).toBe("unsupported-media-type");
      }),
      { numRuns: runs(20) },
    );
  });

  it("huge arrays beyond their limits: histogram bins > 200, table spectra > 5000 entries", async () => {
    const bins = Array.from({ length: 201 }, (_, i) => ({ radiusUm: 10 + i, numberPerM3: 1 }));
    await expectClientError({ method: "POST", url: "/v1/profile", payload: JSON.stringify({ drops: { kind: "histogram", bins } }) }, 400, "drops.bins");
    const n = 5001;
    const table = { kind: "table", wavelengthsNm: Array.from({ length: n }, (_, i) => 300 + i * 0.1), values: Array.from({ length: n }, () => 1) };
    await expectClientError({ method: "POST", url: "/v1/profile", payload: JSON.stringify({ sun: { spectrum: table } }) }, 400, ["sun.spectrum.wavelengthsNm", "sun.spectrum.values"]);
    await expectClientError({ method: "POST", url: "/v1/profile", payload: JSON.stringify({ drops: { kind: "histogram", bins: [] } }) }, 400, "drops.bins");
    await expectClientError({ method: "POST", url: "/v1/scatter", payload: JSON.stringify({ method: "airy", orders: Array.from({ length: 14 }, () => 2) }) }, 400, "orders");
    await expectClientError({ method: "POST", url: "/v1/profile", payload: JSON.stringify({ drops: { kind: "no-such-kind" } }) }, 400, ["drops", "drops.kind"]);
  });

  it("absurd sizes and ranges: every request gets 400 or 422, never a 5xx", async () => {
    const absurd = fc.constantFrom(
      { url: "/v1/view", body: { camera: { widthPx: -5 } }, field: "camera.widthPx" },
      { url: "/v1/view", body: { camera: { widthPx: 1e9, heightPx: 1e9 } }, field: "camera.widthPx" },
      { url: "/v1/sky", body: { widthPx: 100, heightPx: 10 }, field: "heightPx" },
      { url: "/v1/profile", body: { angles: { fromDeg: 60, toDeg: 30 } }, field: "angles.toDeg" },
      { url: "/v1/profile", body: { angles: { fromDeg: 0, toDeg: 180, stepDeg: 0.0001 } }, field: "angles.stepDeg" },
      { url: "/v1/profile", body: { spectral: { fromNm: 700, toNm: 400 } }, field: "spectral.toNm" },
      { url: "/v1/profile", body: { spectral: { fromNm: 400, toNm: 700, stepNm: 7 } }, field: "spectral.stepNm" },
      { url: "/v1/profile", body: { drops: { kind: "histogram", bins: [{ radiusUm: 20, numberPerM3: 1 }, { radiusUm: 10, numberPerM3: 1 }] } }, field: "drops.bins" },
      { url: "/v1/profile", body: { sun: { spectrum: { kind: "table", wavelengthsNm: [400, 500, 600], values: [1, 2] } } }, field: "sun.spectrum.values" },
      { url: "/v1/profile", body: { water: { salinityPsu: 35 } }, field: "spectral.fromNm" },
      { url: "/v1/scatter", body: { scatteringAngles: { fromDeg: 0, toDeg: 180, stepDeg: 0.0001 } }, field: "scatteringAngles.stepDeg" },
      { url: "/v1/scatter", body: { refractiveIndex: { re: 1.33 }, water: {} }, field: "water" },
      { url: "/v1/scatter", body: { wavelengthNm: 5000 }, field: "wavelengthNm" },
      { url: "/v1/scatter", body: { debyeOrder: 2 }, field: "debyeOrder" },
      { url: "/v1/lut", body: { angles: { fromDeg: 50, toDeg: 40 } }, field: "angles.toDeg" },
      { url: "/v1/lut", body: { sizes: { kind: "radius", fromUm: 500, toUm: 100 } }, field: "sizes.toUm" },
      { url: "/v1/lut", body: { sizes: { kind: "radius", texels: 100000 } }, field: "sizes.texels" },
      // The rules across a profile's fields hold wherever its physics is sent (a texture's scenario once gave a 500).
      { url: "/v1/lut", body: { scenario: { water: { temperatureC: 15, salinityPsu: 35 } } }, field: "scenario.spectral.fromNm" },
      { url: "/v1/view", body: { scenario: { water: { salinityPsu: 35 } } }, field: "scenario.spectral.fromNm" },
      { url: "/v1/sky", body: { scenario: { sun: { spectrum: { kind: "table", wavelengthsNm: [400, 500, 600], values: [1, 2] } } }, widthPx: 8, heightPx: 4 }, field: "scenario.sun.spectrum.values" },
      { url: "/v1/figure/size-map", body: { water: { salinityPsu: 35 } }, field: "spectral.fromNm" },
      { url: "/v1/figure/size-map", body: { spectral: { fromNm: 400, toNm: 700, stepNm: 7 } }, field: "spectral.stepNm" },
    );
    await fc.assert(
      fc.asyncProperty(absurd, async ({ url, body, field }) => expectClientError({ method: "POST", url, payload: JSON.stringify(body) }, 400, field)),
      { numRuns: runs(30) },
    );
    // Valid but huge: the synchronous budget must refuse it quickly with 422 rather than compute for minutes.
    for (const [url, body] of [
      ["/v1/scatter", { radiusUm: 5000, wavelengthNm: 400, scatteringAngles: { fromDeg: 0, toDeg: 180, stepDeg: 0.001 } }],
      ["/v1/profile", { method: "mie", drops: { kind: "monodisperse", radiusUm: 3000 }, angles: { fromDeg: 0, toDeg: 180, stepDeg: 0.045 }, spectral: { fromNm: 360, toNm: 830, stepNm: 1 } }],
    ] as const) {
      const req: Sent = { method: "POST", url, payload: JSON.stringify(body) };
      const res = await send(req);
      expect(res.statusCode, describeRequest(req, res)).toBe(422);
      expect(expectErrorShape(req, res).error).toBe("too-costly");
    }
  });

  it("invalid queries, unknown routes and presets give 400 or 404 in the common shape", async () => {
    const cases = fc.constantFrom(
      { method: "POST" as const, url: "/v1/profile?format=gif", status: 400, field: "format" },
      { method: "POST" as const, url: "/v1/profile?format=png&height=-1", status: 400, field: "height" },
      { method: "POST" as const, url: "/v1/profile?format=png&height=abc", status: 400, field: "height" },
      { method: "POST" as const, url: "/v1/profile?format=png&height=1e400", status: 400, field: "height" },
      { method: "POST" as const, url: "/v1/profile?bitDepth=12", status: 400, field: "bitDepth" },
      { method: "POST" as const, url: "/v1/profile?colour=red", status: 400, field: "colour" },
      { method: "POST" as const, url: "/v1/lut?format=tiff", status: 400, field: "format" },
      { method: "POST" as const, url: "/v1/lut?part=everything", status: 400, field: "part" },
      { method: "POST" as const, url: "/v1/view?format=jpeg", status: 400, field: "format" },
      { method: "POST" as const, url: "/v1/sky?format=svg", status: 400, field: "format" },
      { method: "GET" as const, url: "/v1/water?wavelengthNm=NaN", status: 400, field: "wavelengthNm" },
      { method: "GET" as const, url: "/v1/water?wavelengthNm=Infinity", status: 400, field: "wavelengthNm" },
      { method: "GET" as const, url: "/v1/water?wavelengthNm=1e400", status: 400, field: "wavelengthNm" },
      { method: "GET" as const, url: "/v1/water?temperatureC=-300", status: 400, field: "temperatureC" },
      { method: "GET" as const, url: "/v1/water?salinityPsu=10&wavelengthNm=900", status: 400, field: "wavelengthNm" },
      { method: "GET" as const, url: "/v1/water?unknown=1", status: 400, field: "unknown" },
      { method: "GET" as const, url: "/v1/lut/shader?lang=cuda", status: 400, field: "lang" },
      { method: "GET" as const, url: "/v1/presets/no-such-preset", status: 404, field: "name" },
      { method: "GET" as const, url: "/v1/presets/%2e%2e%2fpackage.json", status: 404, field: "name" },
      { method: "GET" as const, url: "/v1/nothing-here", status: 404, field: undefined },
      { method: "GET" as const, url: "/../../etc/passwd", status: 404, field: undefined },
      { method: "GET" as const, url: "/v1/profile", status: 404, field: undefined },
    );
    await fc.assert(
      fc.asyncProperty(cases, async (c) => {
        const req: Sent = { method: c.method, url: c.url, payload: c.method === "POST" ? "{}" : undefined };
        await expectClientError(req, c.status, c.field);
      }),
      { numRuns: runs(30) },
    );
  });

  it("a body over BODY_LIMIT_BYTES gives 413", async () => {
    const small = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 0, bodyLimitBytes: 2048 } });
    try {
      const payload = JSON.stringify({ drops: { kind: "histogram", bins: Array.from({ length: 150, }, (_, i) => ({ radiusUm: 10 + i, numberPerM3: 1 })) } });
      expect(payload.length).toBeGreaterThan(2048);
      const req: Sent = { method: "POST", url: "/v1/profile", payload };
      const res = await small.inject({ method: "POST", url: req.url, payload, headers: { "content-type": "application/json" } });
      expect(res.statusCode, describeRequest(req, res)).toBe(413);
      expect(expectErrorShape(req, res).error).toBe("body-too-large");
    } finally {
      await small.close();
    }
  });
});
