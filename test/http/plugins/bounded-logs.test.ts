// Log lines stay bounded: the serializers and the message hook of http/plugins/bounded-logs.ts, through pino as
// fastify sets it up, with a request whose URL and headers are as long as Node lets them be and an error whose
// message and stack are far longer. (The built server's log under hostile requests: test/http/hostile-input.test.ts.)
import { describe, it, expect } from "vitest";
import { Writable } from "node:stream";
import Fastify from "fastify";
import { boundedLogger, LOG_LINE_BYTES, LOG_MESSAGE_CHARS, LOG_URL_CHARS } from "../../../http/plugins/bounded-logs.js";

function capture() {
  const lines: string[] = [];
  const stream = new Writable({
    write(chunk: Buffer, _encoding, done) {
      lines.push(...chunk.toString("utf8").split("\n").filter(Boolean));
      done();
    },
  });
  return { lines, stream };
}

describe("bounded logs", () => {
  it("cut the URL, the version header, error messages and stacks, and messages themselves", async () => {
    const { lines, stream } = capture();
    const app = Fastify({ logger: { ...boundedLogger("trace"), stream } as never });
    app.get("/*", async (request) => {
      const error = new Error("m".repeat(100_000));
      error.stack = `Error: ${"s".repeat(100_000)}`;
      request.log.error({ err: error }, "x".repeat(100_000));
      return { ok: true };
    });
    await app.inject({ method: "GET", url: `/${"u".repeat(15_000)}`, headers: { "accept-version": "v".repeat(15_000), host: "h".repeat(15_000) } });
    await app.close();
    expect(lines.length).toBeGreaterThanOrEqual(3);
    for (const line of lines) expect(Buffer.byteLength(line)).toBeLessThanOrEqual(LOG_LINE_BYTES);
    const incoming = JSON.parse(lines.find((l) => l.includes("incoming request"))!) as { req: { url: string; version: string; host: string } };
    expect(incoming.req.url.length).toBeLessThanOrEqual(LOG_URL_CHARS + 20);
    expect(incoming.req.url).toMatch(/… \(15001 chars\)$/);
    expect(incoming.req.version.length).toBeLessThan(60);
    const failed = JSON.parse(lines.find((l) => l.includes('"err"'))!) as { msg: string; err: { message: string; stack: string } };
    expect(failed.msg.length).toBeLessThanOrEqual(LOG_MESSAGE_CHARS + 20);
    expect(failed.err.message).toMatch(/… \(100000 chars\)$/);
  });
});
