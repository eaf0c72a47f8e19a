import { ClientError } from "../requests/client-error.js";
import type { jobErrorCodes } from "../../schemas/responses/error-response.js";

/** Errors only the job endpoints give; their statuses are in pipeline/requests/client-error.ts's catalogue. */
export type JobErrorCode = (typeof jobErrorCodes)[number];

export class JobError extends ClientError {
  constructor(jobCode: JobErrorCode, message: string, details: { field?: string; allowed?: string; [extra: string]: unknown } = {}) {
    super(jobCode, message, details);
  }
}
