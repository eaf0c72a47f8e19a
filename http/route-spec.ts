import type { FastifyReply, FastifyRequest } from "fastify";
import type { z } from "zod";

/** One endpoint: its zod inputs feed both validation and the OpenAPI document. */
export interface RouteSpec<B extends z.ZodType = z.ZodType, Q extends z.ZodType = z.ZodType> {
  method: "GET" | "POST" | "DELETE";
  url: string;
  summary: string;
  description?: string;
  tag: string;
  body?: B;
  query?: Q;
  responses: Record<number, { description: string; contentTypes?: string[] }>;
  /** Named example bodies for the OpenAPI document (invented places only). */
  examples?: Record<string, { summary: string; value: unknown }>;
  handle: (input: { body: z.output<B>; query: z.output<Q>; request: FastifyRequest; reply: FastifyReply }) => Promise<unknown>;
}

export function defineRoute<B extends z.ZodType, Q extends z.ZodType>(spec: RouteSpec<B, Q>): RouteSpec {
  return spec as unknown as RouteSpec;
}
