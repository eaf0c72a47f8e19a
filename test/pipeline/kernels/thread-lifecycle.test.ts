// A kernel thread's warm-up ends when its pool asks it to, and the pool knows when no thread is still warming up
// (pipeline/kernels/thread-lifecycle.ts: a thread stopped while V8 compiles can abort the process).
import { describe, expect, it } from "vitest";
import { Worker } from "node:worker_threads";
import { fileURLToPath } from "node:url";
import { newLifecycleCells, stopWarmUps } from "../../../pipeline/kernels/thread-lifecycle.js";

const lifecycleModule = fileURLToPath(new URL("../../../dist/pipeline/kernels/thread-lifecycle.js", import.meta.url));

/** A thread whose warm-up spins in rounds of 5 ms until told to stop, then reports how many rounds it ran. */
function warmingThread(cells: SharedArrayBuffer): { worker: Worker; rounds: Promise<number> } {
  const source = `
    const { workerData, parentPort } = require("node:worker_threads");
    import(${JSON.stringify(lifecycleModule)}).then(({ warmUpCounted }) => {
      let rounds = 0;
      const pause = new Int32Array(new SharedArrayBuffer(4));
      parentPort.postMessage("started");
      warmUpCounted(workerData, (stop) => { while (!stop()) { Atomics.wait(pause, 0, 0, 5); rounds++; } });
      parentPort.postMessage(rounds);
    });`;
  const worker = new Worker(source, { eval: true, workerData: cells });
  const rounds = new Promise<number>((resolve) => worker.on("message", (m) => typeof m === "number" && resolve(m)));
  return { worker, rounds };
}

describe("kernel threads' warm-up", () => {
  it("ends when the pool asks, and the pool's wait returns once no thread warms up", async () => {
    const cells = newLifecycleCells();
    const { worker, rounds } = warmingThread(cells);
    await new Promise<void>((resolve) => worker.once("message", () => resolve()));
    await new Promise((resolve) => setTimeout(resolve, 100));
    const t0 = Date.now();
    await stopWarmUps(cells, 10_000);
    // Returned well before its 10 s cap: the thread saw the request and left its warm-up.
    expect(Date.now() - t0).toBeLessThan(2_000);
    expect(new Int32Array(cells)[1]).toBe(0);
    expect(await rounds).toBeGreaterThan(5);
    await worker.terminate();
  });

  it("returns at its cap while a thread still warms up", async () => {
    const cells = newLifecycleCells();
    const view = new Int32Array(cells);
    // As a thread that has not (yet) seen the request: counted as warming up.
    Atomics.add(view, 1, 1);
    const t0 = Date.now();
    await stopWarmUps(cells, 200);
    expect(Date.now() - t0).toBeGreaterThanOrEqual(190);
    expect(Atomics.load(view, 0)).toBe(1);
  });
});
