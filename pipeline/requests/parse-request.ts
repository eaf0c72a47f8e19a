import { z } from "zod";
import { ClientError } from "./client-error.js";
import { previewText, previewValue } from "./preview.js";
import type { JsonSchemaNode } from "../../schemas/json-schema.js";

type JsonSchema = JsonSchemaNode;

const jsonSchemaCache = new WeakMap<z.ZodType, JsonSchema>();

function jsonSchemaOf(schema: z.ZodType): JsonSchema {
  let js = jsonSchemaCache.get(schema);
  if (!js) {
    js = z.toJSONSchema(schema, { io: "input", unrepresentable: "any" }) as JsonSchema;
    jsonSchemaCache.set(schema, js);
  }
  return js;
}

/** Follows a zod issue path through the JSON Schema, choosing the union branch that matches the sent value. */
function schemaAtPath(root: JsonSchema, path: PropertyKey[], value: unknown): JsonSchema | undefined {
  let node: JsonSchema | undefined = root;
  let current: unknown = value;
  for (const key of path) {
    node = pickBranch(node, current);
    if (!node) return undefined;
    if (typeof key === "number") node = node.items;
    else node = node.properties?.[String(key)];
    current = current && typeof current === "object" ? (current as Record<PropertyKey, unknown>)[key] : undefined;
  }
  return pickBranch(node, current);
}

function pickBranch(node: JsonSchema | undefined, value: unknown): JsonSchema | undefined {
  const branches = node?.oneOf ?? node?.anyOf;
  if (!branches) return node;
  const kind = value && typeof value === "object" ? (value as { kind?: unknown }).kind : undefined;
  const byKind = branches.find((b) => b.properties?.kind?.const === kind);
  return byKind ?? branches.find((b) => b.type !== "null") ?? node;
}

function describeRange(node: JsonSchema): string | undefined {
  if (node.enum) return `one of ${node.enum.map((v) => JSON.stringify(v)).join(", ")}`;
  if (node.const !== undefined) return `exactly ${JSON.stringify(node.const)}`;
  const lo = node.minimum ?? node.exclusiveMinimum;
  const hi = node.maximum ?? node.exclusiveMaximum;
  if (lo !== undefined || hi !== undefined) {
    const left = lo === undefined ? "" : `${node.exclusiveMinimum !== undefined ? ">" : ">="} ${lo}`;
    const right = hi === undefined ? "" : `${node.exclusiveMaximum !== undefined ? "<" : "<="} ${hi}`;
    return `a finite number ${[left, right].filter(Boolean).join(" and ")}`;
  }
  if (node.minItems !== undefined || node.maxItems !== undefined) {
    return `an array of ${node.minItems ?? 0} to ${node.maxItems ?? "any number of"} items`;
  }
  const branches = node.oneOf ?? node.anyOf;
  if (branches) {
    const kinds = branches.map((b) => b.properties?.kind?.const).filter((k) => k !== undefined);
    if (kinds.length) return `an object whose kind is one of ${kinds.map((k) => JSON.stringify(k)).join(", ")}`;
  }
  if (node.properties) return `an object with the fields ${Object.keys(node.properties).join(", ")}`;
  if (node.type) return `a value of type ${Array.isArray(node.type) ? node.type.join(" or ") : node.type}`;
  return undefined;
}

/** drops.radii[3]; names a client sent are cut to a preview, and so is the whole path. */
function formatPath(path: PropertyKey[]): string {
  let out = "";
  for (const key of path) {
    // An empty name (a query string "?=1") still names something.
    const name = key === "" ? '""' : previewText(String(key), 40);
    out += typeof key === "number" ? `[${key}]` : out ? `.${name}` : name;
    if (out.length > 160) break;
  }
  return previewText(out, 160);
}

/**
 * Parses input with a zod schema, or throws a 400 that names the field and what it allows. `prefix` is where the
 * input sits inside the request (a job's `body`), so that the field is named from the request's root.
 */
export function parseOrThrow<S extends z.ZodType>(schema: S, input: unknown, where: "body" | "query", prefix: readonly PropertyKey[] = []): z.output<S> {
  checkNumbersAsText(jsonSchemaOf(schema), input, where, prefix);
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const root = jsonSchemaOf(schema);
  let path = issue.path;
  let allowed: string | undefined;
  let message: string;
  if (issue.code === "unrecognized_keys") {
    const node = schemaAtPath(root, path, input);
    const field = formatPath([...prefix, ...path, issue.keys[0]]);
    allowed = node?.properties ? `the fields ${Object.keys(node.properties).join(", ")}` : undefined;
    message = `${where} field '${field}' is not known${allowed ? `; allowed here are ${allowed}` : ""}`;
    path = [...path, issue.keys[0]];
  } else {
    const node = schemaAtPath(root, path, input);
    allowed = node ? describeRange(node) : undefined;
    const field = formatPath([...prefix, ...path]) || "(root)";
    const sent = valueAt(input, path);
    // Never JSON.stringify what was sent: it may be large, or (from a query string) anything at all.
    const sentText = sent === undefined ? "missing" : previewValue(sent);
    message = `${where} field '${field}' is invalid (${previewText(issue.message, 200)}; sent ${sentText})${allowed ? `: allowed is ${allowed}` : ""}`;
  }
  throw new ClientError("invalid-request", message, {
    field: formatPath([...prefix, ...path]) || undefined,
    ...(allowed ? { allowed } : {}),
  });
}

/**
 * Numbers sent as text (a query string, or a job's query object) are written as JSON writes numbers (RFC 8259 §6).
 * z.coerce.number() calls Number(), which reads "0x10" as 16, "" as 0 and " 5 " as 5; those are refused here,
 * before the schema coerces. A number given as a list (a query parameter given twice) is refused here too, with a
 * message that says so. Only the top level is read: query schemas are flat.
 */
const DECIMAL = /^-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?$/;

function checkNumbersAsText(root: JsonSchema, input: unknown, where: "body" | "query", prefix: readonly PropertyKey[]): void {
  if (!input || typeof input !== "object" || Array.isArray(input)) return;
  const properties = root.properties ?? {};
  for (const [key, value] of Object.entries(input)) {
    const node = Object.prototype.hasOwnProperty.call(properties, key) ? properties[key] : undefined;
    if (!node || (node.type !== "number" && node.type !== "integer")) continue;
    const field = formatPath([...prefix, key]);
    const allowed = describeRange(node);
    const refuse = (what: string) => {
      throw new ClientError("invalid-request", `${where} field '${field}' ${what}${allowed ? `: allowed is ${allowed}` : ""}`, { field, ...(allowed ? { allowed } : {}) });
    };
    if (Array.isArray(value)) refuse(where === "query" && prefix.length === 0 ? `is given ${value.length} times; give it once` : `is a list of ${value.length} values; give one number`);
    if (typeof value === "string" && !DECIMAL.test(value)) refuse(`is not a decimal number (sent ${previewValue(value)})`);
  }
}

function valueAt(input: unknown, path: PropertyKey[]): unknown {
  let v = input;
  for (const key of path) {
    if (!v || typeof v !== "object") return undefined;
    v = (v as Record<PropertyKey, unknown>)[key];
  }
  return v;
}
