import { performance } from "node:perf_hooks";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile } from "../server/profile-service.js";
import { KernelService } from "../server/kernel/kernel-service.js";
import { createInlinePool, createWorkerPool, type KernelPool } from "../server/kernel/worker-pool.js";

export interface ProfileBenchRow {
  name: string;
  workers: number;
  coldMs: number;
  warmMs: number;
  mieTermAngles: number;
}

export const profileWorkloads: { name: string; body: unknown }[] = [
  { name: "P1 default profile `{}` (Marshall–Palmer 2 mm/h, auto)", body: {} },
  {
    name: "P2 fog, lognormal 10 µm, full Mie, ψ 20–60° step 0.2°",
    body: { drops: { kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.4, totalNumberPerM3: 1e8 }, method: "mie", angles: { fromDeg: 20, toDeg: 60, stepDeg: 0.2 } },
  },
  { name: "heavy rain 25 mm/h, auto", body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25 } } },
];

async function once(body: unknown, kernels: KernelService): Promise<{ ms: number; mieTermAngles: number }> {
  const request = profileRequestSchema.parse(body);
  const t0 = performance.now();
  const r = await computeProfile(request, { kernels, limits: { maxTermAngles: Infinity } });
  return { ms: performance.now() - t0, mieTermAngles: r.spectral.mieTermAngles };
}

/** Cold: a fresh in-memory kernel cache; warm: the same request again on the filled cache (median of 5). */
export async function benchProfiles(workers: number[] = [0, 2]): Promise<ProfileBenchRow[]> {
  const rows: ProfileBenchRow[] = [];
  for (const threads of workers) {
    const pool: KernelPool = threads > 0 ? createWorkerPool(threads) : createInlinePool();
    for (const { name, body } of profileWorkloads) {
      const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: pool.compute });
      const cold = await once(body, kernels);
      const warm: number[] = [];
      for (let i = 0; i < 5; i++) warm.push((await once(body, kernels)).ms);
      warm.sort((a, b) => a - b);
      rows.push({ name, workers: threads, coldMs: cold.ms, warmMs: warm[2], mieTermAngles: cold.mieTermAngles });
    }
    await pool.close();
  }
  return rows;
}
