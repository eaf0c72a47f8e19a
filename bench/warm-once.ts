// node dist/bench/warm-once.js <tree>: one process, the default profile `{}` with the build of another checkout
// (<tree>/dist) on 2 worker threads, once to fill the kernel cache, then again WARM_RUNS times on the filled cache
// (npm run bench's "warm" column): prints one JSON line { warmMs (median), warmMinMs, rows } where rows is the
// profile's spectral radiance (to check that two builds give the same numbers). bench/warm-side-by-side.ts runs it.
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { performance } from "node:perf_hooks";

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
await pool.close();
times.sort((a, b) => a - b);
console.log(JSON.stringify({ warmMs: times[Math.floor(times.length / 2)], warmMinMs: times[0], rows: [...last!.spectral.perpendicular, ...last!.spectral.parallel] }));
