// What the kernel pool and its threads share about the threads' start-up, in one SharedArrayBuffer handed to every
// thread (workerData): the pool asks the threads to cut their warm-up short, and learns when none is still warming
// up. Why it matters: a thread stopped while V8 still compiles its code on a background thread can abort the whole
// process (Node 20.20: "Assertion failed: (data.first) != nullptr" in NodePlatform::ForIsolate, from a TurboFan job
// allocating after the thread's isolate left the platform; seen in CI on 2026-12-04 when a test closed a pool whose
// threads were warming up). So the pool never stops a thread that warms up, nor one that has just run code.

/** Cell 0: 1 once the pool closes (threads skip the rest of their warm-up). Cell 1: threads now warming up. */
const STOP = 0;
const WARMING = 1;

export function newLifecycleCells(): SharedArrayBuffer {
  return new SharedArrayBuffer(2 * Int32Array.BYTES_PER_ELEMENT);
}

/** Thread side: runs `warmUp` counted as warming up, and hands it the pool's request to stop early. */
export function warmUpCounted(buffer: SharedArrayBuffer | undefined, warmUp: (stop: () => boolean) => void): void {
  const cells = buffer ? new Int32Array(buffer) : new Int32Array(2);
  Atomics.add(cells, WARMING, 1);
  try {
    warmUp(() => Atomics.load(cells, STOP) === 1);
  } finally {
    Atomics.sub(cells, WARMING, 1);
  }
}

/** Pool side: asks the threads to end their warm-up, and resolves once none warms up (or after `capMs`). */
export async function stopWarmUps(buffer: SharedArrayBuffer, capMs: number): Promise<void> {
  const cells = new Int32Array(buffer);
  Atomics.store(cells, STOP, 1);
  const end = Date.now() + capMs;
  while (Atomics.load(cells, WARMING) > 0 && Date.now() < end) await new Promise((resolve) => setTimeout(resolve, 10));
}
