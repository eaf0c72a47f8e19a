// antisolar sequence <job.json> -o <frames.tar>: the body of POST /v1/jobs with `sequence`, rendered here with a
// progress bar that counts frames.

import { writeFile } from "node:fs/promises";
import { jobRequestSchema } from "../schemas/jobs.js";
import { builtInRenderers } from "../pipeline/jobs/renderers.js";
import { asSequenceJob } from "../pipeline/sequence/sequence-job.js";
import { renderSequence } from "../pipeline/sequence/render-sequence.js";
import { parseOrThrow } from "../pipeline/requests/parse-request.js";
import { ClientError } from "../pipeline/requests/client-error.js";
import type { KernelService } from "../pipeline/kernels/kernel-service.js";
import { progressBar } from "./progress-bar.js";

export async function sequenceCommand(job: unknown, output: string, kernels: KernelService): Promise<string> {
  const request = parseOrThrow(jobRequestSchema(Object.keys(builtInRenderers)), job, "body");
  if (!request.sequence) throw new ClientError("invalid-request", "body field 'sequence' is missing: give { fromUtc, toUtc, frames }", { field: "sequence" });
  const { body } = asSequenceJob(request, builtInRenderers);
  const archive = await renderSequence(body, builtInRenderers, { kernels, maxTermAngles: Infinity, onProgress: progressBar("frames") });
  await writeFile(output, archive.body);
  return `wrote ${output}: ${body.sequence.frames} frames of ${body.endpoint} and manifest.json`;
}
