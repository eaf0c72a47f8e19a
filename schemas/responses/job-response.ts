import { z } from "zod";
import { jobProgressSchema, jobStates } from "./error-response.js";

export { jobStates };

/** What a job backend stores for each job (in memory or in Redis). */
export const jobRecordSchema = z.strictObject({
  id: z.string(),
  endpoint: z.string().describe("the render endpoint whose work the job does"),
  state: z.enum(jobStates),
  progress: jobProgressSchema,
  hash: z.string().describe("content hash of endpoint, normalised body and query: identical requests share a result"),
  reused: z.boolean().describe("true when the result was already there and nothing was rendered"),
  createdAt: z.string().describe("ISO 8601 time"),
  startedAt: z.string().optional(),
  finishedAt: z.string().optional(),
  attempts: z.number().int().min(0).describe("times a worker started the job (above 1 after a worker died and the job was retried)"),
  worker: z.string().optional().describe("host:pid of the process that ran it last"),
  error: z.string().optional().describe("why it failed, for people"),
});

export const jobResponseSchema = jobRecordSchema
  .omit({ worker: true })
  .extend({
    links: z.strictObject({
      self: z.string(),
      events: z.string().describe("server-sent events of its progress"),
      result: z.string().describe("the output once done"),
    }),
  })
  .describe("A background job: POST /v1/jobs, GET and DELETE /v1/jobs/:id, and the data of each /events event");

export type JobState = (typeof jobStates)[number];
export type JobRecord = z.infer<typeof jobRecordSchema>;
export type JobResponse = z.infer<typeof jobResponseSchema>;
