import { ClientError } from "../requests/client-error.js";
import type { jobErrorCodes } from "../../schemas/responses/error-response.js";

/** Errors of the job endpoints whose status has no code in pipeline/requests/client-error.ts's catalogue yet. */
export type JobErrorCode = (typeof jobErrorCodes)[number];

const statusByCode: Record<JobErrorCode, number> = {
  "job-not-finished": 409,
  "job-failed": 409,
  "job-cancelled": 409,
  "result-expired": 410,
  "not-ready": 503,
};

export class JobError extends ClientError {
  constructor(jobCode: JobErrorCode, message: string, details: { field?: string; allowed?: string; [extra: string]: unknown } = {}) {
    super("invalid-request", message, details);
    // The app's error handler sends `status` and `toBody()`, which reads `code`: both take the job's values.
    Object.assign(this, { code: jobCode, status: statusByCode[jobCode] });
  }
}
