import { performance } from "node:perf_hooks";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool, type KernelPool } from "../pipeline/kernels/worker-pool.js";
import { loadConfig } from "../pipeline/config/config.js";
import { DiskStore } from "../pipeline/kernels/disk-store.js";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { MieSampling } from "../lib/bow/mie-sub-lattice.js";

/** Time between starting a pool and the request in the "started" figure: the warm-up rounds take about 0.4 s. */
export const STARTED_WAIT_MS = 3000;

export interface ProfileBenchRow {
  name: string;
  workers: number;
  /** Empty kernel cache, threads already started and warmed by one other request. */
  coldMs: number;
  /** Empty kernel cache on a pool created for the request, threads not warmed up (thread start and JIT included). */
  firstMs: number | null;
  /** Empty kernel cache on a pool started STARTED_WAIT_MS earlier with the service's default warm-up rounds. */
  startedMs: number | null;
  /** With the disk tier: a new kernel service (empty memory, as after a restart) reading the cold request's packs. */
  fromDiskMs: number | null;
  /** The same request again on the filled kernel cache (median of 5); null where not measured. */
  warmMs: number | null;
  mieTermAngles: number;
  kernelBytes: number;
  /** CPU time of the whole process (all threads) during the cold request over its wall time: the cores it got. */
  coldCores: number;
}

export interface ProfileWorkload {
  name: string;
  body: Record<string, unknown>;
  workers: number[];
  warm: boolean;
  /** With the disk tier (the service's default CACHE_DIR): cold on an empty disk, then from disk with an empty memory. */
  disk?: boolean;
}

export const P1: ProfileWorkload = { name: "P1 default profile `{}` (Marshall–Palmer 2 mm/h, auto)", body: {}, workers: [2], warm: true };
export const P1_DISK: ProfileWorkload = { ...P1, name: "P1 default profile `{}`, with the disk tier (CACHE_DIR)", warm: false, disk: true };
/** The default profile with every drop by Lorenz–Mie: what exact Mie costs where auto sends large drops to Airy. */
export const P1_MIE: ProfileWorkload = { name: "P1 default profile with `method: \"mie\"`", body: { method: "mie" }, workers: [2], warm: false };
export const P2: ProfileWorkload = {
  name: "P2 fog, lognormal 10 µm (σg 1.4), full Mie, ψ 20–60° step 0.2° (auto: 512 Mie sizes per decade)",
  body: { drops: { kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.4, totalNumberPerM3: 1e8 }, method: "mie", angles: { fromDeg: 20, toDeg: 60, stepDeg: 0.2 } },
  workers: [2],
  warm: true,
};
/** P2 with one size per radius node, as before the ripple averaging: what the averaging costs. */
export const P2_ONE_SIZE: ProfileWorkload = {
  name: "P2 with one Mie size per radius node (mieSizesPerDecade 64; ripple not averaged)",
  body: { ...P2.body, mieSizesPerDecade: 64 },
  workers: [2],
  warm: false,
};
export const P3: ProfileWorkload = {
  name: "P3 rain, Marshall–Palmer 25 mm/h (radii to the 3 mm cap), full Mie",
  body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25 }, method: "mie" },
  workers: [1, 2],
  warm: false,
};
/**
 * Flattened drops (issue 13): one size, so one radius node, 41 wavelengths × 5 canting nodes of 3D ray tracing.
 * A rain distribution multiplies this by its ~50 radius nodes above 150 µm and is not run here.
 */
export const P4: ProfileWorkload = {
  name: "P4 flattened drops: 1 mm equilibrium drops (canting 7.5°), top of the bow, default wavelengths and angles",
  body: { drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium" } }, arcPositionDeg: 0 },
  workers: [2],
  warm: true,
};

async function once(body: unknown, kernels: KernelService): Promise<{ ms: number; mieTermAngles: number; cores: number }> {
  const request = profileRequestSchema.parse(body);
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const r = await computeProfile(request, { kernels, limits: { maxTermAngles: Infinity } });
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  return { ms, mieTermAngles: r.spectral.mieTermAngles, cores: (cpu.user + cpu.system) / 1000 / ms };
}

// parallelism: the pool's threads, as the service sets it (pipeline/kernels/runtime.ts): flattened drops' tasks are split by it.
const freshCache = (pool: KernelPool, disk?: DiskStore, mieSampling?: MieSampling) =>
  new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute, disk, mieSampling, parallelism: pool.threads });

/** An empty disk tier in a temporary folder, as the service's CACHE_DIR on first start. */
async function emptyDisk(): Promise<{ disk: DiskStore; remove: () => Promise<void> }> {
  const folder = await mkdtemp(join(tmpdir(), "antisolar-bench-"));
  return { disk: new DiskStore(folder), remove: () => rm(folder, { recursive: true, force: true }) };
}

/** The default profile with the water 1 °C warmer: other kernels, the Mie and Airy code paths (warms threads and JIT). */
const WARM_UP_BODY = { water: { temperatureC: 16 } };

/** options.mieSampling "lattice": the Lorenz–Mie rows at every lattice point, as before the sub-lattice (bench/sub-lattice-profiles.ts). */
export async function benchProfile(w: ProfileWorkload, options: { first?: boolean; mieSampling?: MieSampling } = {}): Promise<ProfileBenchRow[]> {
  const rows: ProfileBenchRow[] = [];
  for (const threads of w.workers) {
    let firstMs: number | null = null;
    let startedMs: number | null = null;
    if (options.first) {
      const bare = createWorkerPool(threads);
      firstMs = (await once(w.body, freshCache(bare))).ms;
      await bare.close();
      const started = createWorkerPool(threads, { warmUpRounds: loadConfig({}).workerWarmUpRounds });
      await new Promise((resolve) => setTimeout(resolve, STARTED_WAIT_MS));
      startedMs = (await once(w.body, freshCache(started))).ms;
      await started.close();
    }
    const pool = createWorkerPool(threads);
    await once(WARM_UP_BODY, freshCache(pool, undefined, options.mieSampling));
    const tier = w.disk ? await emptyDisk() : undefined;
    const kernels = freshCache(pool, tier?.disk, options.mieSampling);
    const cold = await once(w.body, kernels);
    let fromDiskMs: number | null = null;
    if (tier) {
      await kernels.flush();
      fromDiskMs = (await once(w.body, freshCache(pool, tier.disk, options.mieSampling))).ms;
      await tier.remove();
    }
    let warmMs: number | null = null;
    if (w.warm) {
      const warm: number[] = [];
      for (let i = 0; i < 5; i++) warm.push((await once(w.body, kernels)).ms);
      warm.sort((a, b) => a - b);
      warmMs = warm[2];
    }
    rows.push({
      name: w.name,
      workers: threads,
      coldMs: cold.ms,
      firstMs,
      startedMs,
      fromDiskMs,
      warmMs,
      mieTermAngles: cold.mieTermAngles,
      kernelBytes: kernels.memory.calculatedSize,
      coldCores: cold.cores,
    });
    await pool.close();
  }
  return rows;
}
