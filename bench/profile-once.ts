// node dist/bench/profile-once.js <tree> <workload> [rows]: one process, one cold profile of a flattened-drop
// workload (or of the fog P2) with the build of another checkout (<tree>/dist), as npm run bench's P4 row takes it (2 worker threads,
// warmed by one other request, a kernel service that knows the pool's threads, as the service's: runtime.ts), printed
// as one JSON line { coldMs, coldCores, threadsBusy }; with "rows", the profile's spectral rows instead, to compare two
// builds' numbers. bench/side-by-side.ts runs it.
//
// coldCores: the process's CPU time over the wall time, which other processes on the machine lower. threadsBusy: the
// time the threads held a kernel task over the wall time, which they do not: the pool queues tasks first in, first out,
// so each task starts when it is sent or when the thread that frees first ends its task, whichever is later (ends as
// the main thread hears of them).

import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { performance } from "node:perf_hooks";

type Workload = { body: Record<string, unknown> };
/**
 * Workloads by name: P4 (bench/profiles.ts), P4 with upright drops (one canting node), the full-Mie fog P2, S2-shapes,
 * and bench/shaped-profiles.ts's default profile with equilibrium shapes and P5.
 */
const WORKLOADS: Record<string, (profiles: { P2: Workload; P4: Workload }) => Record<string, unknown>> = {
  P4: ({ P4 }) => P4.body,
  "P4-upright": ({ P4 }) => ({ ...P4.body, drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } } }),
  P2: ({ P2 }) => P2.body,
  // A shower of flattened drops: every radius its own shape, the default canting, every 20 nm (issue 13's shower rows).
  "S2-shapes": () => ({
    spectral: { fromNm: 380, toNm: 780, stepNm: 20 },
    drops: { kind: "marshall-palmer", rainRateMmPerH: 2, shape: { kind: "equilibrium" } },
    arcPositionDeg: 0,
  }),
  // The default profile (Marshall–Palmer 2 mm/h, side of the bow) with equilibrium shapes, and 25 mm/h (issue 13's goals).
  "default-shapes": () => ({ drops: { kind: "marshall-palmer", rainRateMmPerH: 2, shape: { kind: "equilibrium" } } }),
  P5: () => ({ drops: { kind: "marshall-palmer", rainRateMmPerH: 25, shape: { kind: "equilibrium" } } }),
};
/** As bench/profiles.ts's warm-up: the default profile with the water 1 °C warmer. */
const WARM_UP_BODY = { water: { temperatureC: 16 } };
const THREADS = 2;

const [tree, name, mode] = process.argv.slice(2);
const at = (path: string) => import(pathToFileURL(join(tree, "dist", path)).href);
const profiles = await at("bench/profiles.js");
const { createWorkerPool } = await at("pipeline/kernels/worker-pool.js");
const { KernelService } = await at("pipeline/kernels/kernel-service.js");
const { computeProfile } = await at("pipeline/compute/profile.js");
const { profileRequestSchema } = await at("schemas/profile.js");

const pool = createWorkerPool(THREADS, { filename: join(tree, "dist/pipeline/kernels/kernel-worker.js") });
let tasks: { sent: number; ended: number }[] | null = null;
const compute = (task: unknown, signal?: AbortSignal) => {
  const record = tasks ? { sent: performance.now(), ended: NaN } : null;
  if (record) tasks!.push(record);
  const running = pool.compute(task, signal) as Promise<unknown>;
  return record ? running.then((r) => ((record.ended = performance.now()), r)) : running;
};
const fresh = () => new KernelService({ memoryBudgetBytes: 2 ** 31, compute, parallelism: THREADS });
const profile = (body: unknown) => computeProfile(profileRequestSchema.parse(body), { kernels: fresh(), limits: { maxTermAngles: Infinity } });

await profile(WARM_UP_BODY);
const body = WORKLOADS[name](profiles);
tasks = [];
const cpu0 = process.cpuUsage();
const t0 = performance.now();
const result = await profile(body);
const ms = performance.now() - t0;
const cpu = process.cpuUsage(cpu0);
await pool.close();
if (mode === "rows") {
  console.log(JSON.stringify({ perpendicular: Array.from(result.spectral.perpendicular), parallel: Array.from(result.spectral.parallel) }));
} else {
  const free = Array.from({ length: THREADS }, () => t0);
  let held = 0;
  for (const { sent, ended } of tasks) {
    const k = free.indexOf(Math.min(...free));
    held += ended - Math.max(sent, free[k]);
    free[k] = ended;
  }
  console.log(JSON.stringify({ coldMs: ms, coldCores: (cpu.user + cpu.system) / 1000 / ms, threadsBusy: held / ms, tasks: tasks.length }));
}
