// The one JSON shape of every 4xx and 5xx answer (README, Errors): a stable code, a sentence for people, and
// where it applies the field at fault, what it allows and the numbers behind the refusal.
import { z } from "zod";

/** Codes of pipeline/requests/client-error.ts's catalogue. */
export const clientErrorCodes = [
  "invalid-request",
  "invalid-json",
  "unsupported-media-type",
  "body-too-large",
  "headers-too-large",
  "uri-too-long",
  "request-timeout",
  "not-found",
  "too-costly",
  "source-below-horizon",
  "not-acceptable",
  "rate-limited",
  "overloaded",
  "timeout",
  "client-closed",
  "internal",
] as const;

/** Codes of the job endpoints (pipeline/jobs/job-errors.ts). */
export const jobErrorCodes = ["job-not-finished", "job-failed", "job-cancelled", "result-expired", "not-ready"] as const;

export const jobStates = ["queued", "running", "done", "failed", "cancelled"] as const;

export const jobProgressSchema = z
  .strictObject({
    fraction: z.number().min(0).max(1).describe("0 to 1; never falls"),
    stage: z.string().describe("the step the render is at"),
    secondsLeft: z
      .number()
      .nullable()
      .optional()
      .describe("estimated seconds left from the rate so far, (1 − f)·elapsed / (f − f₀); null until there is an estimate"),
  })
  .describe("progress of a job");

export const errorBodySchema = z
  .strictObject({
    error: z.enum([...clientErrorCodes, ...jobErrorCodes]).describe("stable error code"),
    message: z.string().describe("what went wrong and what to do, for people"),
    field: z.string().optional().describe("JSON path of the field at fault (body fields as sent; job fields as body.<path>)"),
    allowed: z.string().optional().describe("the allowed range or choices"),
    requestId: z.string().optional().describe("quote it when reporting a problem; also in the logs"),
    cost: z.number().optional().describe("too-costly: the request's cost (Mie term-angles)"),
    limit: z.number().optional().describe("too-costly: the synchronous limit, in the same unit"),
    jobs: z.string().optional().describe("too-costly: where to submit the request as a background job"),
    state: z.enum(jobStates).optional().describe("job errors: the job's state"),
    progress: jobProgressSchema.optional().describe("job-not-finished: how far the job is"),
    retryAfterS: z.number().optional().describe("not-ready: seconds after which to retry"),
  })
  .describe("Error answer: every 4xx and 5xx status carries this JSON body");

export type ErrorBody = z.infer<typeof errorBodySchema>;
