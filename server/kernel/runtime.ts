import { isAbsolute, join } from "node:path";
import type { Config } from "../config.js";
import { DiskStore } from "./disk-store.js";
import { KernelService } from "./kernel-service.js";
import { createInlinePool, createWorkerPool, type KernelPool } from "./worker-pool.js";

export interface KernelRuntime {
  kernels: KernelService;
  pool: KernelPool;
  close(): Promise<void>;
}

/** The kernel cache and its workers as configured (WORKERS, CACHE_DIR, CACHE_BUDGET_MB). */
export function createKernelRuntime(config: Pick<Config, "workers" | "cacheDir" | "cacheBudgetMb">): KernelRuntime {
  const pool = config.workers > 0 ? createWorkerPool(config.workers) : createInlinePool();
  const folder = config.cacheDir ? (isAbsolute(config.cacheDir) ? config.cacheDir : join(process.cwd(), config.cacheDir)) : "";
  const kernels = new KernelService({
    memoryBudgetBytes: config.cacheBudgetMb * 2 ** 20,
    disk: folder ? new DiskStore(join(folder, "kernels")) : undefined,
    compute: pool.compute,
  });
  return { kernels, pool, close: () => pool.close() };
}
