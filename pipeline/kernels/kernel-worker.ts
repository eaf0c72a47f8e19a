// Worker-thread entry: computes kernel rows off the event loop. Before the thread reports ready to the pool it
// runs the warm-up rounds the pool asked for (workerData.warmUpRounds), so no request pays for compiling the code.
import { move, transferableSymbol, valueSymbol, workerData } from "piscina";
import { kernelRows } from "../../lib/bow/kernel-rows.js";
import { warmUpKernels } from "../../lib/bow/warm-up.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";
import { warmUpCounted } from "./thread-lifecycle.js";

const data = workerData as { warmUpRounds?: number; lifecycle?: SharedArrayBuffer } | undefined;
const rounds = data?.warmUpRounds ?? 0;
if (rounds > 0) warmUpCounted(data?.lifecycle, (stop) => warmUpKernels(rounds, stop));

/**
 * The rows are views of a few buffers (one per cache pack): those move to the main thread instead of being
 * copied, which saved the main thread copying ~45 MB and collecting the garbage per cold default profile.
 */
export default function computeKernelTask(task: KernelTask): KernelTaskResult {
  const result = kernelRows(task);
  const buffers = new Set<ArrayBuffer>();
  for (const rows of result.rows) for (const row of rows) buffers.add(row.buffer as ArrayBuffer);
  for (const sibling of result.siblings ?? []) for (const rows of sibling.rows) for (const row of rows) buffers.add(row.buffer as ArrayBuffer);
  return move({ [transferableSymbol]: [...buffers], [valueSymbol]: result }) as unknown as KernelTaskResult;
}
