import { availableParallelism } from "node:os";

/** Configuration comes from environment variables only (shared/guide/api.md); defaults are documented in README.md. */
export interface Config {
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
}

function intFrom(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === "") return fallback;
  const value = Number(raw);
  if (!Number.isFinite(value) || value <= 0) throw new Error(`${name} must be a positive number, got '${raw}'`);
  return value;
}

export function loadConfig(env: NodeJS.ProcessEnv): Config {
  return {
    port: intFrom(env, "PORT", 8080),
    host: env.HOST || "0.0.0.0",
    logLevel: env.LOG_LEVEL || "info",
    bodyLimitBytes: intFrom(env, "BODY_LIMIT_BYTES", 1_048_576),
    maxTermAngles: intFrom(env, "MAX_TERM_ANGLES", 200_000_000),
    maxProfileTermAngles: intFrom(env, "MAX_PROFILE_TERM_ANGLES", 3_000_000_000),
    workers: env.WORKERS === "0" ? 0 : intFrom(env, "WORKERS", Math.max(1, availableParallelism())),
    cacheDir: env.CACHE_DIR ?? ".cache/antisolar",
    cacheBudgetMb: intFrom(env, "CACHE_BUDGET_MB", 512),
  };
}
