// npm run bench:shapes [-- --full]: flattened drops (issue 13) beside the default profile, in one process on this
// machine; writes the "shapes" section of BENCHMARKS.md.
// Measured: the default profile `{}` (spheres, the service's default), cold and warm; P4 (1 mm equilibrium drops, one
// radius node), cold and warm. With --full also Marshall–Palmer 25 mm/h with equilibrium shapes, cold (~15,000 traced
// scattering planes: most of an hour at today's speed). Without it, that row and the default with equilibrium shapes are
// projected: their number of traced planes (flattened radius nodes × wavelengths × canting nodes) times P4's CPU time
// per plane (cold wall time × cores busy, so everything around the tracing is in it, and other processes on the
// machine are not), over the 2 worker threads. Marked "projected", never as measured.

import { cpus, loadavg } from "node:os";
import { benchProfile, P1, P4, type ProfileWorkload } from "./profiles.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { toDistribution } from "../pipeline/compute/profile.js";
import { planDropShapes } from "../pipeline/compute/drop-shape-plan.js";
import { latticeRadiusQuadrature } from "../lib/drops/lattice-quadrature.js";
import { cantingNodesFive } from "../lib/drops/shape/canting.js";
import { makeWavelengthGrid } from "../lib/spectra/grid.js";

const P5: ProfileWorkload = {
  name: "P5 rain, Marshall–Palmer 25 mm/h, equilibrium shapes (canting 7.5°), side of the bow",
  body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25, shape: { kind: "equilibrium" } } },
  workers: [2],
  warm: false,
};
const DEFAULT_SHAPED = { name: "default profile with equilibrium shapes (Marshall–Palmer 2 mm/h)", body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 2, shape: { kind: "equilibrium" } } } };

/** Scattering planes a request traces cold: flattened radius nodes × wavelengths × canting nodes. */
function tracedPlanes(body: Record<string, unknown>): number {
  const request = profileRequestSchema.parse(body);
  const quadrature = latticeRadiusQuadrature(toDistribution(request.drops));
  const plan = planDropShapes(request, quadrature.radiiUm);
  const spec = plan.shapes.find((s) => s !== undefined);
  if (!spec) return 0;
  const wavelengths = makeWavelengthGrid(request.spectral.fromNm, request.spectral.toNm, request.spectral.stepNm).count;
  return plan.shapes.filter((s) => s !== undefined).length * wavelengths * cantingNodesFive(spec.cantingSdDeg).length;
}

const full = process.argv.includes("--full");
const machine = machineLine();
const date = benchDate();
const loadBefore = loadavg()[0];
const measured = [];
for (const w of full ? [P1, P4, P5] : [P1, P4]) measured.push(...(await benchProfile(w)));
const loadAfter = loadavg()[0];

const p4 = measured.find((r) => r.name === P4.name)!;
const cpuMsPerPlane = (p4.coldMs * p4.coldCores) / tracedPlanes(P4.body);
const rows = measured.map((r) => {
  const planes = tracedPlanes([P1, P4, P5].find((w) => w.name === r.name)!.body);
  return `| ${r.name} | ${planes} | measured | ${r.coldMs.toFixed(0)} | ${r.coldCores.toFixed(2)} | ${r.warmMs === null ? "–" : r.warmMs.toFixed(1)} | ${(r.kernelBytes / 2 ** 20).toFixed(1)} |`;
});
for (const w of full ? [DEFAULT_SHAPED] : [DEFAULT_SHAPED, P5]) {
  const planes = tracedPlanes(w.body);
  rows.push(`| ${w.name} | ${planes} | projected: planes × P4's ${cpuMsPerPlane.toFixed(0)} CPU-ms per plane / 2 cores | ${((planes * cpuMsPerPlane) / 2).toFixed(0)} | – | – | – |`);
}
for (const r of rows) console.log(r);
writeMarkedSection("shapes", [
  "## Flattened drops beside the default profile",
  "",
  `Written by \`npm run bench:shapes\` (bench/shaped-profiles.ts${full ? ", --full" : ""}), ${date}; ${machine}; 2 worker threads; one-minute load`,
  `average ${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end` +
    (Math.max(loadBefore, loadAfter) > cpus().length ? " (above the core count: other processes shared the cores, so times are inflated)." : "."),
  "Cold and warm as in the table of whole profiles above (cold: empty kernel cache, threads warmed by another request; warm:",
  "median of 5 on the filled cache). Traced planes: flattened radius nodes × wavelengths × canting nodes, each one scattering",
  "plane traced (lib/bow/shaped-plane-rows.ts). Projected rows are planes × P4's CPU time per plane over 2 free cores, not measured",
  "(`-- --full` measures Marshall–Palmer 25 mm/h). Goals (issue 13): default cold ≤ 1.5 s, warm ≤ 20 ms; Marshall–Palmer",
  "25 mm/h with equilibrium shapes cold ≤ 3 s.",
  "",
  "| workload | traced planes | how | cold (ms) | cores busy | warm (ms) | kernel cache (MiB) |",
  "|---|---|---|---|---|---|---|",
  ...rows,
]);
