import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Piscina } from "piscina";
import { kernelRows } from "../../lib/bow/kernel-rows.js";
import type { KernelCompute } from "./kernel-service.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";
import { newLifecycleCells, stopWarmUps } from "./thread-lifecycle.js";

/**
 * V8 may still be compiling a thread's code on a background thread after the code ran; a thread stopped then can abort
 * the process (thread-lifecycle.ts). The longest such job measured (node --trace-opt over the 12 warm-up rounds,
 * 2026-12-04, this project's 2-core machine) took 106 ms, and two ended after the warm-up itself had: close() waits
 * this long, about five times that, after the warm-ups (which may have ended just now, unseen) before it stops the threads.
 */
const QUIET_BEFORE_STOP_MS = 500;
/**
 * An aborted task's caller is answered at once, but its thread is stopped only if the task has not ended after this
 * long (our choice: a sphere task ends within it, and by then V8 has compiled what the task runs).
 */
const ABORT_GRACE_MS = 2_000;
/** The longest close() waits for threads to end their warm-up round (two flattened-drop rounds took 1.4 s). */
const WARM_UP_STOP_CAP_MS = 10_000;

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
  const lifecycle = newLifecycleCells();
  const piscina = new Piscina({
    filename: options.filename ?? workerScript(),
    // All threads start with the service, so the first cold request does not wait for thread start-up.
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: 60_000,
    resourceLimits: { maxOldGenerationSizeMb: options.memoryMb ?? 2048 },
    // Each thread runs these rounds of lib/bow/warm-up.ts before it takes a task (also a replacement thread).
    workerData: { warmUpRounds: options.warmUpRounds ?? 0, lifecycle },
  });
  // A task aborted while it ran may still send its answer, which piscina reports as an 'error' event ("unexpected
  // message"). Its request has already failed; an unheard 'error' event would end the process.
  piscina.on("error", (error: unknown) => options.onPoolError?.(error));
  return {
    threads,
    compute: firstInFirstOut(threads, (task, signal) => withAbortGrace(signal, ABORT_GRACE_MS, (late) => piscina.run(task, { signal: late }) as Promise<KernelTaskResult>)),
    close: async () => {
      await stopWarmUps(lifecycle, WARM_UP_STOP_CAP_MS);
      // Also quiet since the last task, which may have ended just now.
      await new Promise((resolve) => setTimeout(resolve, QUIET_BEFORE_STOP_MS));
      await piscina.destroy();
    },
  };
}

/**
 * `run` with a signal that aborts `graceMs` after `signal` does, unless the task has ended by then: piscina stops the
 * thread of a task whose signal aborts, and a thread stopped while V8 compiles can abort the process (thread-lifecycle.ts).
 */
export function withAbortGrace<R>(signal: AbortSignal | undefined, graceMs: number, run: (late?: AbortSignal) => Promise<R>): Promise<R> {
  if (!signal) return run(undefined);
  const late = new AbortController();
  let timer: NodeJS.Timeout | undefined;
  const onAbort = () => {
    timer = setTimeout(() => late.abort(signal.reason), graceMs);
  };
  if (signal.aborted) onAbort();
  else signal.addEventListener("abort", onAbort, { once: true });
  return run(late.signal).finally(() => {
    clearTimeout(timer);
    signal.removeEventListener("abort", onAbort);
  });
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
        // A running task's caller is answered when its signal aborts; its slot stays taken until the task has ended.
        const onRunningAbort = () => reject(signal!.reason);
        signal?.addEventListener("abort", onRunningAbort, { once: true });
        running++;
        run(task, signal)
          .then(resolve, reject)
          .finally(() => {
            signal?.removeEventListener("abort", onRunningAbort);
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
