// Worker-thread entry: computes kernel rows off the event loop. Before the thread reports ready to the pool it
// runs the warm-up rounds the pool asked for (workerData.warmUpRounds), so no request pays for compiling the code.
import { workerData } from "piscina";
import { kernelRows } from "../../lib/bow/kernel-rows.js";
import { warmUpKernels } from "../../lib/bow/warm-up.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";

const rounds = (workerData as { warmUpRounds?: number } | undefined)?.warmUpRounds ?? 0;
if (rounds > 0) warmUpKernels(rounds);

export default function computeKernelTask(task: KernelTask): KernelTaskResult {
  return kernelRows(task);
}
