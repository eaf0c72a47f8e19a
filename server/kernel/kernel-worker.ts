// Worker-thread entry: computes kernel rows off the event loop.
import { kernelRows } from "../../lib/bow/kernel-rows.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";

export default function computeKernelTask(task: KernelTask): KernelTaskResult {
  return kernelRows(task);
}
