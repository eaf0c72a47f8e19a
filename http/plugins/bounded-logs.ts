// Log lines stay bounded whatever a client sends: the request's URL and headers are cut to previews, error messages
// and stacks to a stated length, and so is every message string. pino (through fastify) writes one JSON line per
// call; without these bounds a 16 KiB URL or header, or an error quoting client input, is copied into the log.

import type { FastifyServerOptions } from "fastify";
import { previewText } from "../../pipeline/requests/preview.js";

/** Longest URL, host or version header a log line repeats (our choice). */
export const LOG_URL_CHARS = 200;
/** Longest log message or error message (our choice). */
export const LOG_MESSAGE_CHARS = 500;
/** Longest error stack (our choice: some twenty frames). */
export const LOG_STACK_CHARS = 2000;
/** What a log line can reach with all of the above at their longest, with pino's own fields (checked by tests). */
export const LOG_LINE_BYTES = 4096;

interface LoggedRequest {
  method?: string;
  url?: string;
  host?: string;
  ip?: string;
  headers?: Record<string, unknown>;
  socket?: { remotePort?: number };
}

const cut = (value: unknown, max: number) => (typeof value === "string" ? previewText(value, max) : undefined);

const serializers = {
  req: (req: LoggedRequest) => ({
    method: cut(req.method, 20),
    url: cut(req.url, LOG_URL_CHARS),
    version: cut(req.headers?.["accept-version"], 40),
    host: cut(req.host, LOG_URL_CHARS),
    remoteAddress: req.ip,
    remotePort: req.socket?.remotePort,
  }),
  err: (err: Error & { code?: unknown; statusCode?: unknown; status?: unknown }) => ({
    type: cut(err?.name, 60),
    message: cut(err?.message, LOG_MESSAGE_CHARS),
    code: cut(err?.code, 60),
    statusCode: typeof err?.statusCode === "number" ? err.statusCode : typeof err?.status === "number" ? err.status : undefined,
    stack: cut(err?.stack, LOG_STACK_CHARS),
  }),
};

/** fastify's `logger` option: pino at the given level, with the bounds above. */
export function boundedLogger(level: string): NonNullable<Exclude<FastifyServerOptions["logger"], boolean>> {
  return {
    level,
    serializers,
    hooks: {
      logMethod(args: unknown[], method: (...a: unknown[]) => void) {
        method.apply(this, args.map((a) => (typeof a === "string" ? previewText(a, LOG_MESSAGE_CHARS) : a)));
      },
    },
  } as NonNullable<Exclude<FastifyServerOptions["logger"], boolean>>;
}
