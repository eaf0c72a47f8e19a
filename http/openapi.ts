import { z } from "zod";
import type { RouteSpec } from "./route-spec.js";
import { EYE_SAFETY_CAUTION } from "../pipeline/eye-safety.js";
import { responseSchemas, type ResponseSchemaName } from "../schemas/responses/catalogue.js";
import type { JsonSchemaNode } from "../schemas/json-schema.js";

export interface OpenApiParameter {
  name: string;
  in: "path" | "query";
  required: boolean;
  description?: string;
  schema: JsonSchemaNode;
}

export interface OpenApiResponse {
  description: string;
  content: Record<string, { schema?: JsonSchemaNode }>;
}

export interface OpenApiOperation {
  summary: string;
  description?: string;
  tags: string[];
  parameters?: OpenApiParameter[];
  requestBody?: { required: boolean; content: { "application/json": { schema: JsonSchemaNode; examples?: Record<string, { summary: string; value: unknown }> } } };
  responses: Record<string, OpenApiResponse>;
}

/** The parts of an OpenAPI 3.1 document this service writes. */
export interface OpenApiDocument {
  openapi: "3.1.0";
  info: { title: string; version: string; description: string };
  paths: Record<string, Record<string, OpenApiOperation>>;
  components: { schemas: Record<string, JsonSchemaNode> };
}

/** Requests are described as clients send them (defaults optional), responses as the service writes them. */
export function toJsonSchema(schema: z.ZodType, io: "input" | "output" = "input"): JsonSchemaNode {
  const js = z.toJSONSchema(schema, { io, unrepresentable: "any" }) as JsonSchemaNode & { $schema?: string };
  delete js.$schema;
  return js;
}

/** Where /openapi.json keeps a response body's schema. */
export function responseSchemaRef(name: ResponseSchemaName): JsonSchemaNode {
  return { $ref: `#/components/schemas/${name}` };
}

function jsonBodySchema(status: number, names: ResponseSchemaName | ResponseSchemaName[] | undefined): JsonSchemaNode {
  if (status >= 400) return responseSchemaRef("Error");
  if (names === undefined) return {};
  return Array.isArray(names) ? { oneOf: names.map(responseSchemaRef) } : responseSchemaRef(names);
}

/** Errors any route can give besides those it lists: 413, 415, 429, 503, and a 500 that is a bug. */
const otherErrors: OpenApiResponse = { description: "any other error, in the same shape", content: { "application/json": { schema: responseSchemaRef("Error") } } };

/** OpenAPI 3.1 (whose schemas are JSON Schema 2020-12, what zod emits) built from the route specs. */
export function buildOpenApi(routes: RouteSpec[], version: string): OpenApiDocument {
  const paths: OpenApiDocument["paths"] = {};
  for (const route of routes) {
    const openApiPath = route.url.replace(/:(\w+)/g, "{$1}");
    const parameters: OpenApiParameter[] = [];
    for (const match of route.url.matchAll(/:(\w+)/g)) {
      parameters.push({ name: match[1], in: "path", required: true, schema: { type: "string" } });
    }
    if (route.query) {
      const js = toJsonSchema(route.query);
      for (const [name, schema] of Object.entries(js.properties ?? {})) {
        parameters.push({
          name,
          in: "query",
          required: js.required?.includes(name) ?? false,
          description: schema.description,
          schema,
        });
      }
    }
    const responses: Record<string, OpenApiResponse> = {};
    for (const [status, r] of Object.entries(route.responses)) {
      const types = r.contentTypes ?? ["application/json"];
      responses[status] = {
        description: r.description,
        content: Object.fromEntries(types.map((t) => [t, t === "application/json" ? { schema: jsonBodySchema(Number(status), r.json) } : {}])),
      };
    }
    responses.default = otherErrors;
    paths[openApiPath] ??= {};
    paths[openApiPath][route.method.toLowerCase()] = {
      summary: route.summary,
      description: route.description,
      tags: [route.tag],
      parameters: parameters.length ? parameters : undefined,
      requestBody: route.body
        ? { required: false, content: { "application/json": { schema: toJsonSchema(route.body), ...(route.examples ? { examples: route.examples } : {}) } } }
        : undefined,
      responses,
    };
  }
  return {
    openapi: "3.1.0",
    info: {
      title: "antisolar",
      version,
      description:
        "Physically based rainbows: Lorenz–Mie, Debye, Airy and ray optics of water drops, integrated over drop sizes, " +
        "the sun's spectrum and disc, and the CIE observers.\n\n" +
        EYE_SAFETY_CAUTION,
    },
    paths,
    components: { schemas: Object.fromEntries(Object.entries(responseSchemas).map(([name, schema]) => [name, toJsonSchema(schema, "output")])) },
  };
}
