import { performance } from "node:perf_hooks";

export interface Timing {
  medianMs: number;
  minMs: number;
  runs: number;
}

/** Times fn after warm-up; a checksum of each result is consumed so nothing is optimised away. */
export function timeIt(fn: () => number, opts: { warmup?: number; runs?: number; maxMs?: number } = {}): Timing & { checksum: number } {
  const warmup = opts.warmup ?? 2;
  const runs = opts.runs ?? 9;
  const maxMs = opts.maxMs ?? 20_000;
  let checksum = 0;
  for (let i = 0; i < warmup; i++) checksum += fn();
  const times: number[] = [];
  const start = performance.now();
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    checksum += fn();
    times.push(performance.now() - t0);
    if (performance.now() - start > maxMs && times.length >= 3) break;
  }
  times.sort((a, b) => a - b);
  return { medianMs: times[Math.floor(times.length / 2)], minMs: times[0], runs: times.length, checksum };
}

/** CPU time of this process (all its threads) while fn runs, in ms, and fn's result. */
export function cpuTimed<T>(fn: () => T): { value: T; ms: number } {
  const t0 = process.cpuUsage();
  const value = fn();
  const t = process.cpuUsage(t0);
  return { value, ms: (t.user + t.system) / 1000 };
}
