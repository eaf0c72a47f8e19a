import { z } from "zod";
import { sequenceSchema } from "./sequence.js";

/** POST /v1/jobs: which render, its body, and the options the synchronous endpoint takes in its query string. */
export function jobRequestSchema(endpoints: readonly string[]) {
  return z
    .object({
      endpoint: z.enum(endpoints as [string, ...string[]]).describe("the render endpoint whose work the job does, e.g. profile for POST /v1/profile"),
      body: z
        .record(z.string(), z.unknown())
        .default({})
        .describe("the request body that endpoint takes; checked against its schema, so `{}` gives all defaults"),
      format: z.string().optional().describe("the output file, as `?format=` on the endpoint (a shortcut for query.format)"),
      query: z
        .record(z.string(), z.unknown())
        .default({})
        .describe("the endpoint's other query options as an object, e.g. {\"height\": 64} or {\"part\": \"manifest\"}"),
      sequence: sequenceSchema
        .optional()
        .describe("a span of time instead of one moment (profile, view, sky, lut): one tar archive of numbered frames and manifest.json; the body's sun.at or moon.at gives the place. Progress counts frames; with Redis, a job whose worker dies resumes from the frames already finished"),
    })
    .strict();
}

export const jobIdParamsSchema = z.object({ id: z.string().min(1).max(100) }).strict();

export type JobRequest = z.output<ReturnType<typeof jobRequestSchema>>;
