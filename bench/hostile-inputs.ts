// Generators of structurally hostile requests (fast-check arbitraries), shared by the fuzz test
// (test/http/hostile-input.test.ts) and the measurement (bench/hostile-requests.ts). They build hostile structure
// from scratch — nesting past the limit, huge objects, arrays, strings and names, numbers beyond a double, duplicate
// names, lone surrogates and noncharacters, a byte-order mark, bytes that are not UTF-8, JSON that is not an object,
// broken JSON — and place it at the root, at a real field of the endpoint's schema, or inside a job's body or query.
// Query strings get their own: unknown, repeated, overlong and badly encoded parameters. Every request generated
// breaks a stated limit or rule, so the only right answer is a 4xx. The endpoints and fields come from the
// service's OpenAPI document, so endpoints added later are covered without editing this file.

import fc from "fast-check";
import { JSON_BODY_LIMITS } from "../pipeline/requests/json-body.js";

export interface HostileRequest {
  /** What kind of hostility, for reports: "deep-array@body.drops", "query-repeated", … */
  label: string;
  method: "GET" | "POST";
  url: string;
  contentType?: string;
  payload?: Buffer;
}

type FieldPath = (string | number)[];

export interface HostileTarget {
  method: "GET" | "POST";
  url: string;
  /** Paths of the fields of the body schema, as far down as DEEPEST_FIELD. */
  bodyFields: FieldPath[];
  queryKeys: string[];
  /** POST /v1/jobs only: each job endpoint with its body's fields and its query keys. */
  jobs?: { endpoint: string; bodyFields: FieldPath[]; queryKeys: string[] }[];
}

interface SchemaNode {
  properties?: Record<string, SchemaNode>;
  items?: SchemaNode;
  anyOf?: SchemaNode[];
  oneOf?: SchemaNode[];
  enum?: unknown[];
}
interface OpenApiOperation {
  parameters?: { name: string; in: string }[];
  requestBody?: { content: Record<string, { schema: SchemaNode }> };
}

/** Fields deeper than this are not targeted one by one (the hostile value itself goes deeper). */
const DEEPEST_FIELD = 5;

function fieldPaths(node: SchemaNode | undefined, prefix: FieldPath = [], out: FieldPath[] = []): FieldPath[] {
  if (!node || prefix.length >= DEEPEST_FIELD) return out;
  for (const branch of [...(node.anyOf ?? []), ...(node.oneOf ?? [])]) fieldPaths(branch, prefix, out);
  for (const [name, child] of Object.entries(node.properties ?? {})) {
    out.push([...prefix, name]);
    fieldPaths(child, [...prefix, name], out);
  }
  if (node.items) {
    out.push([...prefix, 0]);
    fieldPaths(node.items, [...prefix, 0], out);
  }
  return out;
}

const bodySchemaOf = (op: OpenApiOperation | undefined) => op?.requestBody?.content["application/json"]?.schema;
const queryKeysOf = (op: OpenApiOperation | undefined) => (op?.parameters ?? []).filter((p) => p.in === "query").map((p) => p.name);

/** Every operation with a body or a query string, from the service's /openapi.json. */
export function hostileTargets(openapi: { paths: Record<string, Record<string, OpenApiOperation>> }): HostileTarget[] {
  const targets: HostileTarget[] = [];
  for (const [url, operations] of Object.entries(openapi.paths)) {
    if (url.includes("{")) continue; // path parameters: covered by the framework-error tests
    for (const [method, op] of Object.entries(operations)) {
      const body = bodySchemaOf(op);
      const queryKeys = queryKeysOf(op);
      if (!body && queryKeys.length === 0) continue;
      const target: HostileTarget = { method: method.toUpperCase() as "GET" | "POST", url, bodyFields: dedupe(fieldPaths(body)), queryKeys };
      const endpoints = body?.properties?.endpoint?.enum;
      if (url === "/v1/jobs" && endpoints) {
        target.jobs = endpoints.map(String).map((endpoint) => {
          // A job endpoint is named after its synchronous route: profile → /v1/profile, figure-size-map → /v1/figure/size-map.
          const sync = openapi.paths[`/v1/${endpoint}`]?.post ?? openapi.paths[`/v1/${endpoint.replace("-", "/")}`]?.post;
          return { endpoint, bodyFields: dedupe(fieldPaths(bodySchemaOf(sync))), queryKeys: queryKeysOf(sync) };
        });
      }
      targets.push(target);
    }
  }
  return targets;
}

function dedupe(paths: FieldPath[]): FieldPath[] {
  const seen = new Map(paths.map((p) => [JSON.stringify(p), p]));
  return [...seen.values()];
}

// ---------- hostile JSON values, as JSON text (ASCII only, so bytes can be spliced in anywhere) ----------

const L = JSON_BODY_LIMITS;

/** Mostly a little past the limit, sometimes far past it (the 100,000-deep array of issue 19). */
const pastLimit = (limit: number, far: number) => fc.oneof({ arbitrary: fc.integer({ min: limit + 1, max: limit + 8 }), weight: 3 }, { arbitrary: fc.integer({ min: limit + 1, max: far }), weight: 2 });

const deep = fc
  .record({ depth: pastLimit(L.maxDepth, 100_000), kind: fc.constantFrom("array", "object", "mixed") })
  .map(({ depth, kind }) => {
    const [open, close] = kind === "array" ? ["[", "]"] : kind === "object" ? ['{"a":', "}"] : ['[{"a":', "}]"];
    const n = kind === "mixed" ? Math.ceil(depth / 2) : depth;
    return { label: `deep-${kind}`, text: open.repeat(n) + "0" + close.repeat(n) };
  });

const wideArray = pastLimit(L.maxItems, 60_000).map((n) => ({ label: "wide-array", text: `[${"0,".repeat(n - 1)}0]` }));

const wideObject = pastLimit(L.maxMembers, 5_000).map((n) => ({ label: "wide-object", text: `{${Array.from({ length: n }, (_, i) => `"k${i}":0`).join(",")}}` }));

const longString = fc
  .record({ n: pastLimit(L.maxStringChars, 200_000), escaped: fc.boolean() })
  .map(({ n, escaped }) => ({ label: escaped ? "long-string-escaped" : "long-string", text: `"${(escaped ? "\\u0041" : "x").repeat(n)}"` }));

const longKey = pastLimit(L.maxKeyChars, 100_000).map((n) => ({ label: "long-key", text: `{"${"k".repeat(n)}":0}` }));

const hugeNumber = fc.oneof(
  fc.integer({ min: 309, max: 99_999 }).map((e) => `1e${e}`),
  fc.integer({ min: 309, max: 99_999 }).map((e) => `-2.5E+${e}`),
  fc.integer({ min: 310, max: 20_000 }).map((digits) => "9".repeat(digits)),
).map((text) => ({ label: "huge-number", text }));

const duplicateKeys = fc
  .record({ key: fc.constantFrom("a", "kind", "radiusUm", "endpoint", "body"), escaped: fc.boolean() })
  .map(({ key, escaped }) => {
    const twin = escaped ? [...key].map((c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, "0")}`).join("") : key;
    return { label: "duplicate-key", text: `{"${key}":1,"${twin}":2}` };
  });

/** "__proto__" (also spelled with escapes) becomes the prototype when an object is copied. */
const protoKey = fc
  .constantFrom('{"__proto__":{"x":1}}', '{"\\u005f_proto__":{}}', '{"a":1,"__proto__":null}')
  .map((text) => ({ label: "proto-key", text }));

const badCodePoint = fc
  .oneof(
    fc.integer({ min: 0xd800, max: 0xdfff }).map((c) => `\\u${c.toString(16)}`),
    fc.integer({ min: 0xd800, max: 0xdbff }).map((c) => `x\\u${c.toString(16)}\\u0041`),
    fc.constantFrom("\\ufdd0", "\\ufdef", "\\ufffe", "\\uffff", "\\ud83f\\udffe", "\\udbff\\udfff"),
  )
  .chain((s) => fc.constantFrom({ label: "bad-unicode-value", text: `"${s}"` }, { label: "bad-unicode-key", text: `{"${s}":0}` }));

/** A hostile value for any place in a body. */
export const hostileValue = fc.oneof(deep, wideArray, wideObject, longString, longKey, hugeNumber, duplicateKeys, protoKey, badCodePoint);

/** JSON text of an object holding `fragment` at `path`: {"a":{"b":[FRAGMENT]}}. */
export function placeAt(path: FieldPath, fragment: string): string {
  let text = fragment;
  for (let i = path.length - 1; i >= 0; i--) {
    const key = path[i];
    text = typeof key === "number" ? `[${text}]` : `{${JSON.stringify(key)}:${text}}`;
  }
  return text;
}

// ---------- whole bodies ----------

/** Bodies that are wrong as a whole: not an object, not JSON, not UTF-8, a byte-order mark. */
const wholeBody = fc.oneof(
  fc.constantFrom('"x"', "12", "-0.5", "null", "true", "[]", "[{}]", '""').map((t) => ({ label: "not-an-object", bytes: Buffer.from(t) })),
  deep.map((d) => ({ label: `root-${d.label}`, bytes: Buffer.from(d.text) })),
  fc.constantFrom("{}", '{"a":1}').map((t) => ({ label: "bom", bytes: Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(t)]) })),
  fc.constantFrom("", " ", "\n\t").map((t) => ({ label: "empty", bytes: Buffer.from(t) })),
  fc.constantFrom("{", '{"a":', '{"a":1,}', "{'a':1}", '{"a":01}', '{"a":NaN}', '{"a":Infinity}', "{}{}", '{"a":"\\x"}', '{"a":"\u0001"}', "<xml/>").map((t) => ({ label: "broken-json", bytes: Buffer.from(t) })),
  fc.uint8Array({ minLength: 1, maxLength: 2000 }).map((b) => ({ label: "random-bytes", bytes: Buffer.concat([Buffer.from([0x7b]), Buffer.from(b), Buffer.from([0xff])]) })),
);

/** Byte sequences that are never UTF-8 (RFC 3629 §3–4): a lone continuation, 0xFF, an overlong '/', an encoded surrogate, a cut sequence. */
const NOT_UTF8 = [[0x80], [0xff], [0xfe], [0xc0, 0xaf], [0xed, 0xa0, 0x80], [0xe2, 0x82], [0xf4, 0x90, 0x80, 0x80]];

function spliceBytes(text: string, at: number, bytes: number[]): Buffer {
  const ascii = Buffer.from(text, "latin1");
  const i = Math.min(at, ascii.length);
  return Buffer.concat([ascii.subarray(0, i), Buffer.from(bytes), ascii.subarray(i)]);
}

interface HostileBody {
  label: string;
  text: string;
  /** Bytes that are not UTF-8, spliced in at a position. */
  bytes?: { at: number; bytes: number[] };
}

/** A body for an endpoint: a hostile value at one of its fields, or at an unknown field, or bad bytes in a good body. */
function bodyFor(fields: FieldPath[]): fc.Arbitrary<HostileBody> {
  const path = fields.length ? fc.oneof(fc.constantFrom(...fields), fc.constant<FieldPath>(["unknownField"])) : fc.constant<FieldPath>(["unknownField"]);
  return fc.oneof(
    { weight: 6, arbitrary: fc.record({ path, value: hostileValue }).map(({ path, value }) => ({ label: `${value.label}@${path.join(".")}`, text: placeAt(path, value.text) })) },
    {
      weight: 1,
      arbitrary: fc.record({ path, at: fc.nat(), bytes: fc.constantFrom(...NOT_UTF8) }).map(({ path, at, bytes }) => ({ label: "not-utf8", text: placeAt(path, '"abc"'), bytes: { at, bytes } })),
    },
  );
}

const JSON_TYPES = ["application/json", "application/json; charset=utf-8", "Application/JSON"];

function asRequest(target: { method: "GET" | "POST"; url: string }, label: string, body: { text: string; bytes?: { at: number; bytes: number[] } } | Buffer, contentType = "application/json"): HostileRequest {
  const payload = Buffer.isBuffer(body) ? body : body.bytes ? spliceBytes(body.text, body.bytes.at % (body.text.length + 1), body.bytes.bytes) : Buffer.from(body.text, "latin1");
  return { label, method: target.method, url: target.url, contentType, payload };
}

/** POST /v1/jobs: the hostile value inside `body` or `query` of an otherwise good job. */
function jobRequests(target: HostileTarget) {
  const jobs = target.jobs ?? [];
  if (jobs.length === 0) return undefined;
  return fc.constantFrom(...jobs).chain((job) =>
    fc.oneof(
      bodyFor(job.bodyFields).map((b) => ({ ...b, text: `{"endpoint":${JSON.stringify(job.endpoint)},"body":${b.text}}`, label: `job-body:${b.label}`, bytes: b.bytes && { ...b.bytes, at: b.bytes.at + 30 } })),
      fc.record({ key: job.queryKeys.length ? fc.constantFrom(...job.queryKeys, "unknownKey") : fc.constant("unknownKey"), value: hostileValue }).map(({ key, value }) => ({
        label: `job-query:${value.label}@${key}`,
        text: `{"endpoint":${JSON.stringify(job.endpoint)},"query":{${JSON.stringify(key)}:${value.text}}}`,
      })),
      wholeBody.map((w) => ({ label: `job-body:${w.label}`, text: `{"endpoint":${JSON.stringify(job.endpoint)},"body":${w.bytes.toString("latin1")}}` })),
    ),
  );
}

// ---------- query strings ----------

/** Percent-encoded values that are not numbers nor names: encoded lone surrogates, invalid bytes, NUL, broken escapes. */
const BAD_QUERY_VALUES = ["1e400", "-1e400", "NaN", "Infinity", "0x10", "%ED%A0%80", "%FF%FE", "%00", "%", "%zz", "%C0%AF", "%EF%BB%BF1", "1%2C2", "[]", "{}", "true"];

function queryFor(target: HostileTarget) {
  const known = target.queryKeys.length ? fc.constantFrom(...target.queryKeys) : fc.constant("format");
  const name = fc.stringMatching(/^[a-z]{1,8}$/);
  return fc
    .oneof(
      fc.record({ key: known, n: fc.integer({ min: 2, max: 400 }) }).map(({ key, n }) => ({ label: "query-repeated", query: Array(n).fill(`${key}=1`).join("&") })),
      fc.record({ key: known, n: fc.integer({ min: 1000, max: 12_000 }) }).map(({ key, n }) => ({ label: "query-long-value", query: `${key}=${"9".repeat(n)}` })),
      fc.integer({ min: 129, max: 12_000 }).map((n) => ({ label: "query-long-key", query: `${"k".repeat(n)}=1` })),
      fc.record({ key: known, value: fc.constantFrom(...BAD_QUERY_VALUES) }).map(({ key, value }) => ({ label: "query-bad-value", query: `${key}=${value}` })),
      fc.constantFrom("__proto__=1", "constructor=1", "__proto__[x]=1", "a[b]=1", "=1", "%ED%A0%80=1", "%FF=1").map((query) => ({ label: "query-odd-key", query })),
      fc.uniqueArray(name, { minLength: 50, maxLength: 800 }).map((keys) => ({ label: "query-many-keys", query: keys.map((k) => `${k}=1`).join("&") })),
    )
    .map(({ label, query }) => ({ label, url: `${target.url}?${query}` }));
}

/** One hostile request for a target: its body (when it takes one) or its query string. */
export function hostileRequestFor(target: HostileTarget): fc.Arbitrary<HostileRequest> {
  const options: fc.Arbitrary<HostileRequest>[] = [];
  if (target.method === "POST") {
    const jobs = jobRequests(target);
    if (jobs) options.push(jobs.map((b) => asRequest(target, b.label, b)));
    else options.push(fc.record({ body: bodyFor(target.bodyFields), type: fc.constantFrom(...JSON_TYPES) }).map(({ body, type }) => asRequest(target, body.label, body, type)));
    options.push(wholeBody.map((w) => asRequest(target, w.label, w.bytes)));
  }
  if (target.queryKeys.length > 0 || target.method === "GET") {
    options.push(
      queryFor(target).map((q) => ({ label: q.label, method: target.method, url: q.url, ...(target.method === "POST" ? { contentType: "application/json", payload: Buffer.from("{}") } : {}) })),
    );
  }
  return fc.oneof(...options);
}

/** Hostile requests spread over all targets. */
export function hostileRequest(targets: HostileTarget[]): fc.Arbitrary<HostileRequest> {
  return fc.oneof(...targets.map(hostileRequestFor));
}

/** Statuses a hostile request may get: refused as invalid (400), too large (413, 414, 431), wrong media type (415). */
export const HOSTILE_STATUSES = [400, 413, 414, 415, 431];
/** Largest error answer, in bytes: the message with its previews, the field, the allowed range, the request id (our bound). */
export const MAX_ERROR_BYTES = 2048;
