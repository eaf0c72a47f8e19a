// node dist/bench/warm-once.js <tree>: one process, the default profile `{}` with the build of another checkout
// (<tree>/dist) on 2 worker threads, once to fill the kernel cache, then again WARM_RUNS times on the filled cache
// (npm run bench's "warm" column): prints one JSON line { warmMs (median), warmMinMs, rowsPathMs, rows }: rowsPathMs
// is the median with the kept sums over drops (KernelService.sums, where the build has them) cleared before each run,
// so that the profile reads and sums its rows as a request of the same drops over another window would; rows is
// the profile's spectral radiance (to check that two builds give the same numbers). bench/warm-side-by-side.ts runs it.
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { performance } from "node:perf_hooks";
import { median } from "./stats.js";

const WARM_RUNS = 31;
const THREADS = 2;
const [tree] = process.argv.slice(2);
const at = (path: string) => import(pathToFileURL(join(tree, "dist", path)).href);
const { createWorkerPool } = await at("pipeline/kernels/worker-pool.js");
const { KernelService } = await at("pipeline/kernels/kernel-service.js");
const { computeProfile } = await at("pipeline/compute/profile.js");
const { profileRequestSchema } = await at("schemas/profile.js");

const pool = createWorkerPool(THREADS, { filename: join(tree, "dist/pipeline/kernels/kernel-worker.js") });
const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute, parallelism: THREADS });
const deps = { kernels, limits: { maxTermAngles: Infinity } };
const profile = () => computeProfile(profileRequestSchema.parse({}), deps);
await profile();
const times: number[] = [];
let last: { spectral: { perpendicular: Float64Array; parallel: Float64Array } } | undefined;
for (let k = 0; k < WARM_RUNS; k++) {
  const t0 = performance.now();
  last = await profile();
  times.push(performance.now() - t0);
}
const rowsPath: number[] = [];
for (let k = 0; k < WARM_RUNS; k++) {
  (kernels as { sums?: { clear(): void } }).sums?.clear();
  const t0 = performance.now();
  await profile();
  rowsPath.push(performance.now() - t0);
}
await pool.close();
console.log(JSON.stringify({ warmMs: median(times), warmMinMs: Math.min(...times), rowsPathMs: median(rowsPath), rows: [...last!.spectral.perpendicular, ...last!.spectral.parallel] }));
