import { availableParallelism } from "node:os";
import { isAbsolute, join } from "node:path";
import { positiveFromEnv } from "./env.js";
import { AUTO_MIE_BUDGET_TERM_ANGLES, AUTO_SHARE_COST_FACTOR } from "../../lib/bow/engine-choice.js";
// The job and Redis settings (REDIS_URL, JOB_*) live in pipeline/jobs/job-config.ts.
import { loadJobConfig, type JobConfig } from "../jobs/job-config.js";

/** Configuration comes from environment variables only; defaults are documented in README.md. */
export interface Config extends JobConfig {
  port: number;
  host: string;
  logLevel: string;
  bodyLimitBytes: number;
  /** Largest synchronous single-drop request, in Mie terms × angles. */
  maxTermAngles: number;
  /** Largest synchronous profile, in Mie terms × angles summed over radii and wavelengths. */
  maxProfileTermAngles: number;
  /** Worker threads for kernels; 0 computes on the main thread (tests). */
  workers: number;
  /** Kernel cache folder; empty for memory only. */
  cacheDir: string;
  /** Memory for cached kernels and results, MiB. */
  cacheBudgetMb: number;
  /** Origins allowed by CORS; empty turns CORS off. */
  corsOrigins: string[];
  /** Requests per minute per client address; 0 turns the limit off. */
  rateLimitPerMinute: number;
  /** Event-loop delay above which requests get 503 with Retry-After. */
  maxEventLoopDelayMs: number;
  /** Resident memory above which requests get 503. */
  maxRssMb: number;
  /** Longest a synchronous request may take before it is answered with 503. */
  requestTimeoutMs: number;
  /** Heap limit of each kernel worker thread; a worker over it fails only its request and is replaced. */
  workerMemoryMb: number;
  /** Rounds of kernel tasks like a request's (rain, fog, then a flattened drop) each worker thread runs at start (lib/bow/warm-up.ts); 0: none. */
  workerWarmUpRounds: number;
  /**
   * SIGTERM → exit at most this long, ms: below the 30 s most container platforms wait before SIGKILL. Work still in
   * hand shortly before the end is given back (jobs) or aborted (requests).
   */
  shutdownGraceMs: number;
}

export function loadConfig(env: NodeJS.ProcessEnv): Config {
  return {
    port: positiveFromEnv(env, "PORT", 8080),
    host: env.HOST || "0.0.0.0",
    logLevel: env.LOG_LEVEL || "info",
    bodyLimitBytes: positiveFromEnv(env, "BODY_LIMIT_BYTES", 1_048_576),
    maxTermAngles: positiveFromEnv(env, "MAX_TERM_ANGLES", 200_000_000),
    maxProfileTermAngles: positiveFromEnv(env, "MAX_PROFILE_TERM_ANGLES", AUTO_SHARE_COST_FACTOR * AUTO_MIE_BUDGET_TERM_ANGLES),
    workers: env.WORKERS === "0" ? 0 : positiveFromEnv(env, "WORKERS", Math.max(1, availableParallelism())),
    cacheDir: env.CACHE_DIR ?? ".cache/antisolar",
    cacheBudgetMb: positiveFromEnv(env, "CACHE_BUDGET_MB", 512),
    corsOrigins: (env.CORS_ORIGINS ?? "").split(",").map((o) => o.trim()).filter(Boolean),
    rateLimitPerMinute: env.RATE_LIMIT_PER_MINUTE === "0" ? 0 : positiveFromEnv(env, "RATE_LIMIT_PER_MINUTE", 1200),
    // 0 turns the overload guard off (as RATE_LIMIT_PER_MINUTE=0 does the rate limit).
    maxEventLoopDelayMs: env.MAX_EVENT_LOOP_DELAY_MS === "0" ? 0 : positiveFromEnv(env, "MAX_EVENT_LOOP_DELAY_MS", 1000),
    maxRssMb: positiveFromEnv(env, "MAX_RSS_MB", 4096),
    requestTimeoutMs: positiveFromEnv(env, "REQUEST_TIMEOUT_MS", 120_000),
    workerMemoryMb: positiveFromEnv(env, "WORKER_MEMORY_MB", 2048),
    workerWarmUpRounds: env.WORKER_WARM_UP_ROUNDS === "0" ? 0 : positiveFromEnv(env, "WORKER_WARM_UP_ROUNDS", 12),
    shutdownGraceMs: positiveFromEnv(env, "SHUTDOWN_GRACE_MS", 20_000),
    ...loadJobConfig(env),
  };
}

/** CACHE_DIR as an absolute folder (relative to the working directory), or "" when caching to disk is off. */
export function cacheFolder(cacheDir: string): string {
  return cacheDir ? (isAbsolute(cacheDir) ? cacheDir : join(process.cwd(), cacheDir)) : "";
}
