import type { FastifyReply, FastifyRequest } from "fastify";
import type { z } from "zod";
import type { ResponseSchemaName } from "../schemas/responses/catalogue.js";

/** A status's answer: its content types and, for JSON, the schema(s) of schemas/responses/ it follows (errors: always Error). */
export interface ResponseSpec {
  description: string;
  contentTypes?: string[];
  json?: ResponseSchemaName | ResponseSchemaName[];
}

/** One endpoint: its zod inputs feed both validation and the OpenAPI document. */
export interface RouteSpec<B extends z.ZodType = z.ZodType, Q extends z.ZodType = z.ZodType> {
  method: "GET" | "POST" | "DELETE";
  url: string;
  summary: string;
  description?: string;
  tag: string;
  body?: B;
  query?: Q;
  responses: Record<number, ResponseSpec>;
  /** Named example bodies for the OpenAPI document (invented places only). */
  examples?: Record<string, { summary: string; value: unknown }>;
  handle: (input: { body: z.output<B>; query: z.output<Q>; request: FastifyRequest; reply: FastifyReply }) => Promise<unknown>;
}

export function defineRoute<B extends z.ZodType, Q extends z.ZodType>(spec: RouteSpec<B, Q>): RouteSpec {
  return spec as unknown as RouteSpec;
}
