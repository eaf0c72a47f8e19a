// Chooses how jobs run: in this process (no REDIS_URL), or through Redis with separate workers (REDIS_URL), where
// an API process also runs jobs itself only with JOBS_IN_PROCESS=1.

import { join } from "node:path";
import { cacheFolder, type Config } from "../config/config.js";
import type { KernelRuntime } from "../kernels/runtime.js";
import { DiskStore } from "../kernels/disk-store.js";
import { builtInRenderers, type RendererRegistry } from "./renderers.js";
import { EmbeddedJobBackend } from "./embedded-backend.js";
import { RedisJobBackend } from "./redis-backend.js";
import { startRedisWorker, type RunningWorker } from "./redis-worker.js";
import type { JobBackend, JobRecord } from "./job-types.js";

export interface JobSystem {
  backend: JobBackend;
  registry: RendererRegistry;
  /** Aborted when the process shuts down: event streams end then. */
  closing: AbortSignal;
  /** Ends the event streams (the first step of a shutdown, so that they do not hold the server open). */
  endStreams(): void;
  /** A job this process runs itself is given back to the queue at giveBackAt (ms since the epoch) if still running. */
  close(giveBackAt?: number): Promise<void>;
}

export async function createJobSystem(
  config: Config,
  runtime: KernelRuntime,
  options: { registry?: RendererRegistry; onError?: (error: unknown, record: JobRecord) => void } = {},
): Promise<JobSystem> {
  const registry = options.registry ?? builtInRenderers;
  const closing = new AbortController();
  if (!config.redisUrl) {
    const folder = cacheFolder(config.cacheDir);
    const backend = new EmbeddedJobBackend({
      registry,
      kernels: runtime.kernels,
      maxTermAngles: config.jobMaxTermAngles,
      concurrency: config.jobConcurrency,
      disk: folder ? new DiskStore(join(folder, "jobs")) : undefined,
      // Finished results share the memory budget like the synchronous answers: a sixteenth.
      memoryBudgetBytes: (config.cacheBudgetMb * 2 ** 20) / 16,
      onError: options.onError,
    });
    return {
      backend,
      registry,
      closing: closing.signal,
      endStreams: () => closing.abort(),
      close: async () => {
        closing.abort();
        await backend.close();
      },
    };
  }
  const backend = new RedisJobBackend(config);
  let worker: RunningWorker | undefined;
  if (config.jobsInProcess) {
    worker = await startRedisWorker({ config, registry, kernels: runtime.kernels, maxTermAngles: config.jobMaxTermAngles });
  }
  return {
    backend,
    registry,
    closing: closing.signal,
    endStreams: () => closing.abort(),
    close: async (giveBackAt?: number) => {
      closing.abort();
      await worker?.close(giveBackAt);
      await backend.close();
    },
  };
}
