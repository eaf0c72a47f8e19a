import { join } from "node:path";
import { cacheFolder, type Config } from "../config/config.js";
import { DiskStore } from "./disk-store.js";
import { KernelService } from "./kernel-service.js";
import { createInlinePool, createWorkerPool, type KernelPool } from "./worker-pool.js";
import { kernelRedis, RedisKernelStore } from "./redis-kernel-store.js";

/** Kernel packs in Redis expire after 30 days without a write (our choice for a cache; memory is bounded by Redis's eviction). */
const KERNEL_TTL_S = 30 * 86_400;

export interface KernelRuntime {
  kernels: KernelService;
  pool: KernelPool;
  close(): Promise<void>;
}

/** The kernel cache and its workers as configured (WORKERS, WORKER_MEMORY_MB, WORKER_WARM_UP_ROUNDS, CACHE_DIR, CACHE_BUDGET_MB, REDIS_URL). */
export function createKernelRuntime(
  config: Pick<Config, "workers" | "cacheDir" | "cacheBudgetMb"> & Partial<Pick<Config, "redisUrl" | "redisPrefix" | "workerMemoryMb" | "workerWarmUpRounds">>,
): KernelRuntime {
  const pool = config.workers > 0 ? createWorkerPool(config.workers, { memoryMb: config.workerMemoryMb, warmUpRounds: config.workerWarmUpRounds }) : createInlinePool();
  const folder = cacheFolder(config.cacheDir);
  // With REDIS_URL the second tier is Redis, shared by every API and worker process.
  const redis = config.redisUrl ? kernelRedis(config.redisUrl) : undefined;
  const disk = folder ? new DiskStore(join(folder, "kernels")) : undefined;
  const kernels = new KernelService({
    // Profile answers, view answers and finished jobs keep a sixteenth of the budget each (routes/profile.ts,
    // routes/view.ts, jobs/job-system.ts); kernels take the rest.
    memoryBudgetBytes: (config.cacheBudgetMb * 2 ** 20 * 13) / 16,
    // With both, the local folder stands in for Redis while Redis is away.
    disk: redis ? new RedisKernelStore(redis, config.redisPrefix ?? "antisolar", KERNEL_TTL_S, disk) : disk,
    compute: pool.compute,
    parallelism: pool.threads,
  });
  return {
    kernels,
    pool,
    close: async () => {
      await pool.close();
      await kernels.flush();
      redis?.disconnect();
    },
  };
}
