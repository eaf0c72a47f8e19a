// Errors fastify and Node's HTTP parser answer themselves, before any route or error handler runs, come out in the
// service's one error shape ({ error, message, field, allowed, requestId }) instead of fastify's default bodies:
// headers too large (431), a request that took too long to arrive (408), bytes that are not HTTP (400), a URL with
// broken percent-encoding (400) and a path parameter over the length limit (414). Nothing the client sent is
// repeated beyond a preview.

import { randomUUID } from "node:crypto";
import { STATUS_CODES } from "node:http";
import type { Socket } from "node:net";
import type { FastifyError, FastifyReply, FastifyRequest, FastifyServerOptions } from "fastify";
import { ClientError } from "../../pipeline/requests/client-error.js";
import { previewText } from "../../pipeline/requests/preview.js";

/** fastify's default for `maxParamLength`: longer path parameters are refused before routing. */
export const MAX_PARAM_CHARS = 100;

/** Node's HTTP parser codes (llhttp) and timeouts, as our errors. */
export function connectionError(error: NodeJS.ErrnoException): ClientError {
  switch (error.code) {
    case "HPE_HEADER_OVERFLOW":
      return new ClientError("headers-too-large", "the request line and headers together are larger than the limit (16 KiB, Node's maxHeaderSize)", {
        field: "headers",
        allowed: "at most 16 KiB of request line and headers",
      });
    case "ERR_HTTP_REQUEST_TIMEOUT":
      return new ClientError("request-timeout", "the request did not arrive in full within the time limit", { field: "body" });
    default:
      return new ClientError("invalid-request", `the request is not valid HTTP/1.1 (${previewText(String(error.code ?? "unknown"), 40)})`);
  }
}

function clientErrorHandler(error: NodeJS.ErrnoException, socket: Socket): void {
  if (error.code === "ECONNRESET" || socket.destroyed) return;
  if (socket.writable) {
    const mapped = connectionError(error);
    const body = JSON.stringify(mapped.toBody(randomUUID()));
    socket.write(
      `HTTP/1.1 ${mapped.status} ${STATUS_CODES[mapped.status]}\r\nContent-Type: application/json; charset=utf-8\r\n` +
        `Content-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body}`,
    );
  }
  socket.destroy(error);
}

/** Errors fastify raises while routing, before any handler. */
export function routingError(error: FastifyError): ClientError | undefined {
  switch (error.code) {
    case "FST_ERR_BAD_URL":
      return new ClientError("invalid-request", "the URL path has broken percent-encoding (RFC 3986 §2.1)", { field: "url", allowed: "a path of UTF-8 percent-encoded bytes" });
    case "FST_ERR_MAX_PARAM_LENGTH":
      return new ClientError("uri-too-long", `a path parameter is longer than ${MAX_PARAM_CHARS} characters`, { field: "url", allowed: `path parameters of at most ${MAX_PARAM_CHARS} characters` });
  }
  return undefined;
}

function frameworkErrors(error: FastifyError, request: FastifyRequest, reply: FastifyReply): void {
  const mapped = routingError(error);
  if (mapped) {
    reply.status(mapped.status).send(mapped.toBody(request.id));
    return;
  }
  request.log.error({ err: error }, "framework error");
  reply.status(500).send({ error: "internal", message: "internal error; report the requestId", requestId: request.id });
}

/** Spread into Fastify({...}) in http/app.ts. */
export function frameworkErrorOptions(): Pick<FastifyServerOptions, "clientErrorHandler" | "frameworkErrors" | "routerOptions"> {
  return { clientErrorHandler, frameworkErrors, routerOptions: { maxParamLength: MAX_PARAM_CHARS } };
}
