// POST /v1/jobs with `sequence` beside endpoint and body: the job becomes a "sequence" job whose body holds the
// endpoint, its body and query, and the span; the first frame's body is checked now, so faults are 400s at once.

import { SEQUENCE_ENDPOINTS, sequenceSchema, type SequenceJobBody } from "../../schemas/sequence.js";
import type { JobRequest } from "../../schemas/jobs.js";
import type { RendererRegistry } from "../jobs/renderers.js";
import { ClientError } from "../requests/client-error.js";
import { parseOrThrow } from "../requests/parse-request.js";
import { frameBody, frameMoments } from "./render-sequence.js";

export const SEQUENCE_RENDERER = "sequence";

export function asSequenceJob(job: JobRequest & { sequence?: unknown }, registry: RendererRegistry): { endpoint: string; body: SequenceJobBody; query: Record<string, unknown> } {
  const endpoint = job.endpoint as SequenceJobBody["endpoint"];
  if (!(SEQUENCE_ENDPOINTS as readonly string[]).includes(endpoint)) {
    throw new ClientError("invalid-request", `body field 'endpoint' is ${job.endpoint}: a sequence renders ${SEQUENCE_ENDPOINTS.join(", ")}`, {
      field: "endpoint",
      allowed: SEQUENCE_ENDPOINTS.join(", "),
    });
  }
  const sequence = parseOrThrow(sequenceSchema, job.sequence, "body", ["sequence"]);
  const query = { ...job.query, ...(job.format !== undefined ? { format: job.format } : {}) };
  const body: SequenceJobBody = { endpoint, body: job.body, query, sequence };
  const renderer = registry[endpoint];
  parseOrThrow(renderer.body, frameBody(body, frameMoments(sequence)[0]), "body", ["body"]);
  parseOrThrow(renderer.query, query, "body", ["query"]);
  return { endpoint: SEQUENCE_RENDERER, body, query: {} };
}
