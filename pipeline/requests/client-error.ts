// The catalogue of errors a client can see: a stable code, a status and the one JSON shape the README documents
// ({ error, message, field, allowed, requestId }).

import type { ErrorBody, clientErrorCodes, jobErrorCodes } from "../../schemas/responses/error-response.js";

export type { ErrorBody };
export type ErrorCode = (typeof clientErrorCodes)[number] | (typeof jobErrorCodes)[number];

const statusByCode: Record<ErrorCode, number> = {
  "invalid-request": 400,
  "invalid-json": 400,
  "unsupported-media-type": 415,
  "body-too-large": 413,
  "headers-too-large": 431,
  "uri-too-long": 414,
  "request-timeout": 408,
  "not-found": 404,
  "too-costly": 422,
  "source-below-horizon": 422,
  "not-acceptable": 406,
  "rate-limited": 429,
  overloaded: 503,
  timeout: 503,
  // nginx's "client closed request": nobody reads it, but logs show why the work stopped.
  "client-closed": 499,
  internal: 500,
  // The job endpoints' own (pipeline/jobs/job-errors.ts).
  "job-not-finished": 409,
  "job-failed": 409,
  "job-cancelled": 409,
  "result-expired": 410,
  "not-ready": 503,
};

/** An error whose message is meant for the client. */
export class ClientError extends Error {
  readonly status: number;
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly details: { field?: string; allowed?: string; [extra: string]: unknown } = {},
  ) {
    super(message);
    this.status = statusByCode[code];
  }

  toBody(requestId: string): ErrorBody {
    return { error: this.code, message: this.message, ...this.details, requestId };
  }
}
