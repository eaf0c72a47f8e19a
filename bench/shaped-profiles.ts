// npm run bench:shapes: flattened drops (issue 13) beside the default profile, in one process on this machine; writes
// the "shapes" section of BENCHMARKS.md. Measured, all cold (empty kernel cache) and P1 and P4 also warm: the default
// profile `{}` (spheres, the service's default); P4 (1 mm equilibrium drops, one radius node); the default profile with
// equilibrium shapes (Marshall–Palmer 2 mm/h); P5 (Marshall–Palmer 25 mm/h with equilibrium shapes). The planes column
// counts the scattering planes traced and the rows made per wavelength from them. Earlier runs projected the showers
// from a CPU time per plane; since rows made per wavelength cost next to nothing where the aligned blend serves them
// (lib/bow/aligned-blend.ts), that model no longer holds, and the showers are measured.

import { cpus, loadavg } from "node:os";
import { benchProfile, P1, P4, type ProfileWorkload } from "./profiles.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { toDistribution } from "../pipeline/compute/profile.js";
import { planDropShapes, shapedPlaneCounts } from "../pipeline/compute/drop-shape-plan.js";
import { latticeRadiusQuadrature } from "../lib/drops/lattice-quadrature.js";
import { makeWavelengthGrid } from "../lib/spectra/grid.js";
import { INDEX_NODES } from "../lib/bow/shaped-rows.js";

const P5: ProfileWorkload = {
  name: "P5 rain, Marshall–Palmer 25 mm/h, equilibrium shapes (canting 7.5°), side of the bow",
  body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25, shape: { kind: "equilibrium" } } },
  workers: [2],
  warm: false,
};
const DEFAULT_SHAPED: ProfileWorkload = {
  name: "default profile with equilibrium shapes (Marshall–Palmer 2 mm/h)",
  body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 2, shape: { kind: "equilibrium" } } },
  workers: [2],
  warm: false,
};

interface PlaneCount {
  /** Planes traced at the water's fixed indices, and rows made per wavelength from them, as the service computes the request. */
  traced: number;
  interpolated: number;
  /** Shapes whose canting mean is taken by rotation over the pupil (no planes: lib/bow/canting-rotation.ts). */
  rotation: number;
}

/** Scattering planes a request computes cold (one task per shape, split by canting node: pipeline/kernels/kernel-service.ts). */
function planeCount(body: Record<string, unknown>): PlaneCount {
  const request = profileRequestSchema.parse(body);
  const quadrature = latticeRadiusQuadrature(toDistribution(request.drops));
  const plan = planDropShapes(request, quadrature.radiiUm);
  if (!plan.shapes.some((s) => s !== undefined)) return { traced: 0, interpolated: 0, rotation: 0 };
  const wavelengths = makeWavelengthGrid(request.spectral.fromNm, request.spectral.toNm, request.spectral.stepNm).count;
  return { ...shapedPlaneCounts(plan, wavelengths), rotation: plan.rotationShapes };
}

const machine = machineLine();
const date = benchDate();
const loadBefore = loadavg()[0];
const workloads = [P1, P4, DEFAULT_SHAPED, P5];
const measured = [];
for (const w of workloads) measured.push(...(await benchProfile(w)));
const loadAfter = loadavg()[0];
const rows = measured.map((r) => {
  const c = planeCount(workloads.find((w) => w.name === r.name)!.body);
  return `| ${r.name} | ${c.traced} + ${c.interpolated} | ${c.rotation} | ${r.coldMs.toFixed(0)} | ${r.coldCores.toFixed(2)} | ${r.warmMs === null ? "–" : r.warmMs.toFixed(1)} | ${(r.kernelBytes / 2 ** 20).toFixed(1)} |`;
});
for (const r of rows) console.log(r);
writeMarkedSection("shapes", [
  "## Flattened drops beside the default profile",
  "",
  `Written by \`npm run bench:shapes\` (bench/shaped-profiles.ts), ${date}; ${machine}; 2 worker threads; one-minute load`,
  `average ${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end` +
    (Math.max(loadBefore, loadAfter) > cpus().length ? " (above the core count: other processes shared the cores, so times are inflated)." : "."),
  "Cold and warm as in the table of whole profiles above (cold: empty kernel cache, threads warmed by another request; warm:",
  "median of 5 on the filled cache). Planes: scattering planes traced + rows made per wavelength from them, as the service",
  `computes them (per shape and canting node, each plane traced at ${INDEX_NODES} refractive indices fixed by the water; each`,
  "wavelength's row blended from their bows' uniform tables aligned on the interpolated fold, lib/bow/aligned-blend.ts, or,",
  "where the bow's constants or rows do not follow one polynomial in n, traced at the wavelength's own index). Goals",
  "(issue 13): default cold ≤ 1.5 s, warm ≤ 20 ms; Marshall–Palmer 25 mm/h with equilibrium shapes cold ≤ 3 s. Shapes by rotation:",
  "drops above 1 mm radius whose canting mean is taken over the upright drop's pupil instead of planes (lib/bow/canting-rotation.ts).",
  "",
  "| workload | planes (traced + per wavelength) | shapes by rotation | cold (ms) | cores busy | warm (ms) | kernel cache (MiB) |",
  "|---|---|---|---|---|---|---|",
  ...rows,
]);
