// Fastify's own JSON parser is replaced by ours (pipeline/requests/json-body.ts): it refuses hostile structure —
// deep nesting, huge objects, arrays and strings, duplicate names, numbers beyond a double, bad Unicode — with a
// 400 before anything recursive sees the body.

import type { FastifyInstance } from "fastify";
import { parseJsonBody } from "../../pipeline/requests/json-body.js";

export function registerJsonBody(app: FastifyInstance): void {
  app.removeContentTypeParser("application/json");
  app.addContentTypeParser("application/json", { parseAs: "buffer" }, (_request, body, done) => {
    try {
      done(null, parseJsonBody(body as Buffer));
    } catch (error) {
      done(error as Error, undefined);
    }
  });
}
