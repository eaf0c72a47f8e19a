// What makes the service safe on a network: security headers, CORS only when configured, per-client rate
// limits, and back-pressure (503 with Retry-After) when the event loop or memory is saturated.

import { setMaxListeners } from "node:events";
import type { FastifyInstance, FastifyReply, FastifyRequest } from "fastify";
import cors from "@fastify/cors";
import rateLimit from "@fastify/rate-limit";
import underPressure from "@fastify/under-pressure";
import { ClientError } from "../../pipeline/requests/client-error.js";
import type { Config } from "../../pipeline/config/config.js";

const SECURITY_HEADERS: Record<string, string> = {
  "x-content-type-options": "nosniff",
  "x-frame-options": "DENY",
  "referrer-policy": "no-referrer",
  "cross-origin-opener-policy": "same-origin",
  "cross-origin-resource-policy": "same-origin",
};

/** /docs is plain HTML with one inline style sheet and no scripts. */
const DOCS_CSP = "default-src 'none'; style-src 'unsafe-inline'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

export async function registerHardening(app: FastifyInstance, config: Config): Promise<void> {
  app.addHook("onSend", async (request, reply, payload) => {
    for (const [k, v] of Object.entries(SECURITY_HEADERS)) if (!reply.hasHeader(k)) reply.header(k, v);
    if (request.url.startsWith("/docs")) reply.header("content-security-policy", DOCS_CSP);
    return payload;
  });

  if (config.corsOrigins.length > 0) {
    await app.register(cors, { origin: config.corsOrigins, methods: ["GET", "POST", "DELETE"], exposedHeaders: ["x-antisolar-hash", "x-antisolar-cache", "x-antisolar-sources", "x-antisolar-axes", "x-antisolar-scale", "location", "retry-after"] });
  }

  if (config.rateLimitPerMinute > 0) {
    await app.register(rateLimit, {
      max: config.rateLimitPerMinute,
      timeWindow: 60_000,
      allowList: (request) => request.url === "/healthz" || request.url === "/readyz",
      errorResponseBuilder: (_request, context) =>
        new ClientError("rate-limited", `more than ${context.max} requests per minute from this client; retry in ${Math.ceil(context.ttl / 1000)} s`, {
          allowed: `${context.max} requests per minute`,
        }),
    });
  }

  await app.register(underPressure, {
    maxEventLoopDelay: config.maxEventLoopDelayMs,
    maxRssBytes: config.maxRssMb * 2 ** 20,
    retryAfter: 5,
    exposeStatusRoute: false,
    pressureHandler: (request: FastifyRequest, reply: FastifyReply, type: string) => {
      if (request.url === "/healthz") return; // liveness must answer even under load
      // Rejected, not sent: under-pressure goes on to the route when the handler returns nothing, so a 503 sent
      // here was followed by the route's own work (and fastify's "Reply was already sent"). A rejection is passed
      // on as the request's error, answered by the error handler, and the route never runs.
      reply.header("retry-after", "5");
      return Promise.reject(new ClientError("overloaded", `the service is overloaded (${type}); retry in 5 s`));
    },
  });
}

/** An AbortSignal that fires when the client goes away before the answer is sent, so its work stops. */
export function clientSignal(reply: FastifyReply): AbortSignal {
  const controller = new AbortController();
  setMaxListeners(0, controller.signal);
  // The response closes either when it has been sent, or earlier when the connection drops.
  reply.raw.once("close", () => {
    if (!reply.raw.writableFinished) controller.abort(new ClientError("client-closed", "the client closed the connection"));
  });
  return controller.signal;
}
