// The kernel pool runs its tasks in the order they are sent (first in, first out), also tasks that carry an abort
// signal: the kernel service's order (a flattened shape's parts largest first, a sphere request's wavelengths one
// after another) depends on it.
import { describe, expect, it } from "vitest";
import { fileURLToPath } from "node:url";
import { createWorkerPool, firstInFirstOut, withAbortGrace } from "../../../pipeline/kernels/worker-pool.js";
import type { KernelTask, KernelTaskResult } from "../../../pipeline/kernels/kernel-types.js";

const orderWorker = fileURLToPath(new URL("../../fixtures/order-worker.mjs", import.meta.url));

describe("kernel worker pool", () => {
  it("on one thread, answers 8 abortable tasks in the order they were sent", async () => {
    const pool = createWorkerPool(1, { filename: orderWorker });
    try {
      const signal = new AbortController().signal;
      const answered: number[] = [];
      // Measured with piscina 5.3's own queue: 0, 2, 4, 6, 1, 5, 3, 7 (a task that cannot start goes to the back), and
      // 0, 7, 6, 5, 4, 3, 2, 1 with its stricterFIFO option (to the front).
      await Promise.all(
        Array.from({ length: 8 }, (_, n) =>
          pool.compute({ n } as unknown as KernelTask, signal).then((r) => void answered.push((r as unknown as { n: number }).n)),
        ),
      );
      expect(answered).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
    } finally {
      await pool.close();
    }
  }, 60_000);
});

describe("first in, first out", () => {
  /** A run whose tasks end when the test says. */
  function controlled() {
    const started: number[] = [];
    const finish = new Map<number, (r: KernelTaskResult) => void>();
    const run = (n: number) =>
      new Promise<KernelTaskResult>((resolve) => {
        started.push(n);
        finish.set(n, resolve);
      });
    return { started, end: (n: number) => finish.get(n)!({ rows: [], mieTermAngles: n }), run };
  }
  const settle = () => new Promise<void>((resolve) => setImmediate(resolve));

  it("starts at most `limit` tasks, the next in the order sent as each ends", async () => {
    const { started, end, run } = controlled();
    const compute = firstInFirstOut(2, run);
    const results = [0, 1, 2, 3, 4].map((n) => compute(n));
    expect(started).toEqual([0, 1]);
    end(1);
    await settle();
    expect(started).toEqual([0, 1, 2]);
    end(0);
    end(2);
    await settle();
    expect(started).toEqual([0, 1, 2, 3, 4]);
    end(3);
    end(4);
    expect((await Promise.all(results)).map((r) => r.mieTermAngles)).toEqual([0, 1, 2, 3, 4]);
  });

  it("never sends a waiting task whose signal aborts; a running one's caller is answered at once, its slot freed when it ends", async () => {
    const { started, end, run } = controlled();
    const compute = firstInFirstOut(1, run);
    const stop = new AbortController();
    const first = compute(0, stop.signal);
    const second = compute(1, stop.signal);
    const third = compute(2);
    stop.abort(new Error("client gone"));
    await expect(second).rejects.toThrow("client gone");
    // The running task's caller does not wait for its thread.
    await expect(first).rejects.toThrow("client gone");
    // Already aborted: rejected at once, never queued.
    await expect(compute(3, stop.signal)).rejects.toThrow("client gone");
    await settle();
    // The thread is still busy with task 0: task 2 waits for it.
    expect(started).toEqual([0]);
    end(0);
    await settle();
    expect(started).toEqual([0, 2]);
    end(2);
    await third;
  });
});

describe("abort grace", () => {
  const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

  it("aborts the thread's signal only when the task outlives the grace after its caller's abort", async () => {
    const caller = new AbortController();
    let late: AbortSignal | undefined;
    let finish!: () => void;
    const task = withAbortGrace(caller.signal, 100, (signal) => {
      late = signal;
      return new Promise<void>((resolve, reject) => {
        finish = resolve;
        signal?.addEventListener("abort", () => reject(signal.reason), { once: true });
      });
    });
    const outcome = task.then(() => "resolved", (error: Error) => error.message);
    caller.abort(new Error("client gone"));
    await sleep(30);
    expect(late!.aborted).toBe(false);
    await sleep(150);
    expect(late!.aborted).toBe(true);
    expect(await outcome).toBe("client gone");
    finish();
  });

  it("never aborts the thread's signal of a task that ends within the grace", async () => {
    const caller = new AbortController();
    let late: AbortSignal | undefined;
    const task = withAbortGrace(caller.signal, 100, async (signal) => {
      late = signal;
      await sleep(20);
      return 7;
    });
    caller.abort(new Error("client gone"));
    expect(await task).toBe(7);
    await sleep(150);
    expect(late!.aborted).toBe(false);
  });
});
