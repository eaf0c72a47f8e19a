import { positiveFromEnv } from "../config/env.js";

// Settings of the job system, from environment variables only; defaults in deploy/README.md.

export interface JobConfig {
  /** Redis for the queue, job state, results and the shared kernel cache; empty runs everything in-process. */
  redisUrl: string;
  /** With REDIS_URL: also run jobs in this API process (otherwise it only enqueues). */
  jobsInProcess: boolean;
  /** Mie cost budget of one job (terms × angles); no limit by default. */
  jobMaxTermAngles: number;
  /** Jobs one process runs at the same time; each uses the process's kernel worker threads. */
  jobConcurrency: number;
  /** How long finished results and job records are kept, seconds. */
  jobResultTtlS: number;
  /** A worker's lease on a running job; a job whose worker died is retried after this, ms. */
  jobLockMs: number;
  /** How often workers look for jobs whose worker died, ms. */
  jobStalledIntervalMs: number;
  /** Key prefix in Redis, so that several deployments can share one Redis. */
  redisPrefix: string;
}

export function loadJobConfig(env: NodeJS.ProcessEnv): JobConfig {
  return {
    redisUrl: env.REDIS_URL ?? "",
    jobsInProcess: env.JOBS_IN_PROCESS === "1" || env.JOBS_IN_PROCESS === "true",
    jobMaxTermAngles: positiveFromEnv(env, "JOB_MAX_TERM_ANGLES", Infinity, { allowInfinity: true }),
    jobConcurrency: Math.floor(positiveFromEnv(env, "JOB_CONCURRENCY", 1)),
    jobResultTtlS: Math.floor(positiveFromEnv(env, "JOB_RESULT_TTL_S", 86_400)),
    jobLockMs: Math.floor(positiveFromEnv(env, "JOB_LOCK_MS", 30_000)),
    jobStalledIntervalMs: Math.floor(positiveFromEnv(env, "JOB_STALLED_INTERVAL_MS", 15_000)),
    redisPrefix: env.REDIS_PREFIX || "antisolar",
  };
}
