import { z } from "zod";
import type { RouteSpec } from "./route-spec.js";
import { EYE_SAFETY_CAUTION } from "../pipeline/eye-safety.js";

const errorSchema = {
  type: "object",
  required: ["error", "message"],
  properties: {
    error: { type: "string", description: "stable error code" },
    message: { type: "string" },
    field: { type: "string", description: "JSON path of the field at fault" },
    allowed: { type: "string", description: "the allowed range or choices" },
    requestId: { type: "string" },
  },
};

function toJsonSchema(schema: z.ZodType): Record<string, unknown> {
  const js = z.toJSONSchema(schema, { io: "input", unrepresentable: "any" }) as Record<string, unknown>;
  delete js.$schema;
  return js;
}

/** OpenAPI 3.1 (whose schemas are JSON Schema 2020-12, what zod emits) built from the route specs. */
export function buildOpenApi(routes: RouteSpec[], version: string): Record<string, unknown> {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const route of routes) {
    const openApiPath = route.url.replace(/:(\w+)/g, "{$1}");
    const parameters: unknown[] = [];
    for (const match of route.url.matchAll(/:(\w+)/g)) {
      parameters.push({ name: match[1], in: "path", required: true, schema: { type: "string" } });
    }
    if (route.query) {
      const js = toJsonSchema(route.query) as { properties?: Record<string, { description?: string }>; required?: string[] };
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
    const responses: Record<string, unknown> = {};
    for (const [status, r] of Object.entries(route.responses)) {
      const types = r.contentTypes ?? ["application/json"];
      responses[status] = {
        description: r.description,
        content: Object.fromEntries(types.map((t) => [t, Number(status) >= 400 ? { schema: errorSchema } : {}])),
      };
    }
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
  };
}
