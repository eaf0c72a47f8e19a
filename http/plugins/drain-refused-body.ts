// A request refused for its body size (413) is answered only once the client has finished sending, or after a
// bounded amount of discarded body or time. Fastify refuses the body and closes the connection at once
// ("connection: close"); a client still writing its body then meets a reset socket (EPIPE in Node's fetch) and never
// sees the 413. Reading and discarding the rest before answering is the "lingering close" of RFC 9112 §9.6: every
// common client (fetch, curl, Python requests) then reads the 413 and its JSON error, and the connection closes.

import type { FastifyInstance } from "fastify";
import type { IncomingMessage } from "node:http";

/** At most this much refused body is read and thrown away (our choice: a few seconds of a fast upload). */
export const DRAIN_MAX_BYTES = 64 * 2 ** 20;
/** At most this long is spent waiting for the rest of a refused body (our choice). */
export const DRAIN_MAX_MS = 5_000;

export function registerRefusedBodyDrain(app: FastifyInstance, limits = { maxBytes: DRAIN_MAX_BYTES, maxMs: DRAIN_MAX_MS }): void {
  app.addHook("onSend", async (request, reply, payload) => {
    if (reply.statusCode === 413 && !request.raw.complete) await drain(request.raw, limits.maxBytes, limits.maxMs);
    return payload;
  });
}

/** Reads and discards the rest of a request body; resolves when it has ended, or past the byte or time bound. */
function drain(body: IncomingMessage, maxBytes: number, maxMs: number): Promise<void> {
  return new Promise((resolve) => {
    let bytes = 0;
    const done = () => {
      clearTimeout(timer);
      body.off("data", onData).off("end", done).off("error", done).off("close", done);
      resolve();
    };
    const onData = (chunk: Buffer) => {
      bytes += chunk.length;
      if (bytes > maxBytes) done();
    };
    const timer = setTimeout(done, maxMs);
    body.on("data", onData).once("end", done).once("error", done).once("close", done);
    body.resume();
  });
}
