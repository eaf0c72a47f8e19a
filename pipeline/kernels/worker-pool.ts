import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Piscina } from "piscina";
import { kernelRows } from "../../lib/bow/kernel-rows.js";
import type { KernelCompute } from "./kernel-service.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";

/**
 * The compiled worker script. From dist/ it sits beside this file; from the sources (tests) it is the built copy,
 * which `npm test` builds first.
 */
function workerScript(): string {
  const beside = fileURLToPath(new URL("./kernel-worker.js", import.meta.url));
  if (existsSync(beside)) return beside;
  const built = fileURLToPath(new URL("../../dist/pipeline/kernels/kernel-worker.js", import.meta.url));
  if (existsSync(built)) return built;
  throw new Error("the kernel worker is not built: run `npm run build`");
}

export interface KernelPool {
  compute: KernelCompute;
  threads: number;
  close(): Promise<void>;
}

/**
 * Kernel tasks on worker threads, so that physics never blocks the event loop. A worker that crashes or exceeds
 * its heap limit fails only the task it ran; piscina starts a replacement thread.
 */
export function createWorkerPool(
  threads: number,
  options: { memoryMb?: number; filename?: string; onPoolError?: (error: unknown) => void; warmUpRounds?: number } = {},
): KernelPool {
  const piscina = new Piscina({
    filename: options.filename ?? workerScript(),
    // All threads start with the service, so the first cold request does not wait for thread start-up.
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: 60_000,
    resourceLimits: { maxOldGenerationSizeMb: options.memoryMb ?? 2048 },
    // Each thread runs these rounds of lib/bow/warm-up.ts before it takes a task (also a replacement thread).
    workerData: { warmUpRounds: options.warmUpRounds ?? 0 },
  });
  // A task aborted while it ran may still send its answer, which piscina reports as an 'error' event ("unexpected
  // message"). Its request has already failed; an unheard 'error' event would end the process.
  piscina.on("error", (error: unknown) => options.onPoolError?.(error));
  return {
    threads,
    compute: firstInFirstOut(threads, (task, signal) => piscina.run(task, { signal }) as Promise<KernelTaskResult>),
    close: () => piscina.destroy(),
  };
}

/**
 * `run` called with at most `limit` tasks at once, the others waiting here in the order they came. Piscina's own queue
 * does not keep that order for tasks with an abort signal (all of ours): one it cannot hand to a thread goes back to
 * the end of its queue, or with stricterFIFO to the front, so that tasks sent while the threads are busy run in a
 * rotated or reversed order (piscina 5.3, dist/index.js _returnUndistributedTask; test/pipeline/kernels/worker-pool.test.ts).
 * The kernel service sends a flattened shape's parts largest first (canting-parts.ts) and a sphere request's tasks
 * wavelength by wavelength (rows summed as each wavelength's task ends): both need the order kept. A task whose
 * signal aborts while it waits here is never sent.
 */
export function firstInFirstOut<T>(limit: number, run: (task: T, signal?: AbortSignal) => Promise<KernelTaskResult>): (task: T, signal?: AbortSignal) => Promise<KernelTaskResult> {
  const waiting: (() => void)[] = [];
  let running = 0;
  const next = () => {
    while (running < limit && waiting.length > 0) waiting.shift()!();
  };
  return (task, signal) =>
    new Promise<KernelTaskResult>((resolve, reject) => {
      if (signal?.aborted) return reject(signal.reason);
      const onAbort = () => {
        const at = waiting.indexOf(start);
        if (at >= 0) {
          waiting.splice(at, 1);
          reject(signal!.reason);
        }
      };
      const start = () => {
        signal?.removeEventListener("abort", onAbort);
        running++;
        run(task, signal)
          .then(resolve, reject)
          .finally(() => {
            running--;
            next();
          });
      };
      signal?.addEventListener("abort", onAbort, { once: true });
      waiting.push(start);
      next();
    });
}

/**
 * The same computation on the calling thread (tests, WORKERS=0), each task in a turn of the event loop of its own,
 * so that the tasks done before it are reported (progress) before it blocks the thread.
 */
export function createInlinePool(): KernelPool {
  return {
    threads: 0,
    compute: async (task: KernelTask) => {
      await new Promise<void>((resolve) => setImmediate(resolve));
      return kernelRows(task);
    },
    close: async () => undefined,
  };
}
