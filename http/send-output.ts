import type { FastifyReply } from "fastify";
import type { RenderOutput } from "../pipeline/render/render-output.js";

/** Sends a render on a fastify reply. */
export function sendOutput(reply: FastifyReply, output: RenderOutput, cache: "hit" | "miss") {
  reply.type(output.contentType);
  for (const [k, v] of Object.entries(output.headers)) reply.header(k, v);
  reply.header("x-antisolar-cache", cache);
  return reply.send(output.body);
}

