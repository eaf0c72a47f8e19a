// One profile computed cold (an empty kernel cache of its own on the given threads), timed: what the colour benchmarks
// that compare two ways of computing a workload run side by side.

import { performance } from "node:perf_hooks";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile, type ProfileResolution, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService, type KernelCompute } from "../pipeline/kernels/kernel-service.js";

export async function coldProfile(body: Record<string, unknown>, compute: KernelCompute, resolution: ProfileResolution): Promise<{ result: ProfileResult; ms: number }> {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute, parallelism: 2 });
  const t0 = performance.now();
  const result = await computeProfile(profileRequestSchema.parse(body), { kernels, limits: { maxTermAngles: Infinity } }, resolution);
  return { result, ms: performance.now() - t0 };
}
