// node dist/bench/profile-once.js <tree> <workload> [rows]: one process, one cold profile of a flattened-drop
// workload with the build of another checkout (<tree>/dist: its bench/profiles.ts's benchProfile, 2 worker threads,
// warmed by one other request), printed as one JSON line { coldMs, coldCores }; with "rows", the profile's spectral
// rows instead ({ perpendicular, parallel }), to compare two builds' numbers. bench/side-by-side.ts runs it.

import { join } from "node:path";
import { pathToFileURL } from "node:url";

/** Workloads by name: P4 (bench/profiles.ts) and P4 with upright drops (one canting node). */
const WORKLOADS: Record<string, (p4: { body: Record<string, unknown> }) => Record<string, unknown>> = {
  P4: (p4) => p4.body,
  "P4-upright": (p4) => ({ ...p4.body, drops: { kind: "monodisperse", radiusUm: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } } }),
};

const [tree, name, mode] = process.argv.slice(2);
const at = (path: string) => import(pathToFileURL(join(tree, "dist", path)).href);
const profiles = await at("bench/profiles.js");
const body = WORKLOADS[name](profiles.P4);
if (mode === "rows") {
  const { createWorkerPool } = await at("pipeline/kernels/worker-pool.js");
  const { KernelService } = await at("pipeline/kernels/kernel-service.js");
  const { computeProfile } = await at("pipeline/compute/profile.js");
  const { profileRequestSchema } = await at("schemas/profile.js");
  const pool = createWorkerPool(2, { filename: join(tree, "dist/pipeline/kernels/kernel-worker.js") });
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: pool.compute, parallelism: pool.threads });
  const result = await computeProfile(profileRequestSchema.parse(body), { kernels, limits: { maxTermAngles: Infinity } });
  await pool.close();
  console.log(JSON.stringify({ perpendicular: Array.from(result.spectral.perpendicular), parallel: Array.from(result.spectral.parallel) }));
} else {
  const [row] = await profiles.benchProfile({ name, body, workers: [2], warm: false });
  console.log(JSON.stringify({ coldMs: row.coldMs, coldCores: row.coldCores }));
}
