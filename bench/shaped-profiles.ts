// npm run bench:shapes [-- --full]: flattened drops (issue 13) beside the default profile, in one process on this
// machine; writes the "shapes" section of BENCHMARKS.md.
// Measured: the default profile `{}` (spheres, the service's default), cold and warm; P4 (1 mm equilibrium drops, one
// radius node), cold and warm. With --full also Marshall–Palmer 25 mm/h with equilibrium shapes, cold. Then the CPU
// time of one traced scattering plane and of one plane made per wavelength from the traced ones (P4's drop, in this
// process: lib/bow/shaped-rows.ts's shapedRows at one wavelength and at the request's wavelengths). Without --full,
// Marshall–Palmer 25 mm/h and the default with equilibrium shapes are projected from those: shapes × canting nodes ×
// (traced planes × traced CPU + interpolated planes × interpolated CPU) over 2 cores, and marked "projected", never
// as measured. Before interpolation (shaped engine version 2) every plane was traced: that count is the "planes
// before" column, priced at the traced plane's CPU time of this run.

import { cpus, loadavg } from "node:os";
import { benchProfile, P1, P4, type ProfileWorkload } from "./profiles.js";
import { median } from "./stats.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { toDistribution } from "../pipeline/compute/profile.js";
import { planDropShapes, shapedPlaneCounts } from "../pipeline/compute/drop-shape-plan.js";
import { latticeRadiusQuadrature } from "../lib/drops/lattice-quadrature.js";
import { planeCantingNodes } from "../lib/bow/plane-canting-nodes.js";
import { makeWavelengthGrid, wavelengthsNm } from "../lib/spectra/grid.js";
import { INDEX_NODES, quantiseSpec, shapedRows } from "../lib/bow/shaped-rows.js";
import { dropMedia } from "../lib/water/drop-medium.js";

const P5: ProfileWorkload = {
  name: "P5 rain, Marshall–Palmer 25 mm/h, equilibrium shapes (canting 7.5°), side of the bow",
  body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25, shape: { kind: "equilibrium" } } },
  workers: [2],
  warm: false,
};
const DEFAULT_SHAPED = { name: "default profile with equilibrium shapes (Marshall–Palmer 2 mm/h)", body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 2, shape: { kind: "equilibrium" } } } };

interface PlaneCount {
  /** Planes traced at their own index and planes interpolated across it, as the service computes the request. */
  traced: number;
  interpolated: number;
  /** Planes one per flattened radius node, wavelength and canting node: what was traced before interpolation. */
  before: number;
}

/** Scattering planes a request computes cold (one task per shape, split by canting node: pipeline/kernels/kernel-service.ts). */
function planeCount(body: Record<string, unknown>): PlaneCount {
  const request = profileRequestSchema.parse(body);
  const quadrature = latticeRadiusQuadrature(toDistribution(request.drops));
  const plan = planDropShapes(request, quadrature.radiiUm);
  const spec = plan.shapes.find((s) => s !== undefined);
  if (!spec) return { traced: 0, interpolated: 0, before: 0 };
  const wavelengths = makeWavelengthGrid(request.spectral.fromNm, request.spectral.toNm, request.spectral.stepNm).count;
  const nodes = plan.shapes.filter((s) => s !== undefined).length;
  return { ...shapedPlaneCounts(plan, wavelengths), before: nodes * wavelengths * planeCantingNodes(spec).length };
}

/** CPU ms of one traced and one interpolated plane of P4's drop (canting 0: one plane per index), in this process. */
function planeCpuMs(): { tracedMs: number; interpolatedMs: number } {
  const request = profileRequestSchema.parse(P4.body);
  const spec = quantiseSpec({ kind: "equilibrium", cantingSdDeg: 0, sunElevationDeg: request.sun.elevationDeg, arcPositionDeg: request.arcPositionDeg ?? 0, rayOnly: false });
  const grid = makeWavelengthGrid(request.spectral.fromNm, request.spectral.toNm, request.spectral.stepNm);
  const { media } = dropMedia(request.water, wavelengthsNm(grid));
  // Θ over the default angles (ψ 30–60° at 0.05°, as P4's kernels).
  const thetaDeg = Float64Array.from({ length: 600 }, (_, j) => 120.025 + 0.05 * j);
  const drop = (radiusUm: number, m: (typeof media)[number]) => ({ radiusUm, mRe: m.mRe, x: (2 * Math.PI * m.nAir * radiusUm) / (m.wavelengthNm * 1e-3) });
  const cpu = (fn: () => void) => {
    const t0 = process.cpuUsage();
    fn();
    const t = process.cpuUsage(t0);
    return (t.user + t.system) / 1000;
  };
  // Another radius each time, so that nothing is shared between the runs; the first runs warm the code. Medians of 5
  // and 3 runs: single runs on a shared machine varied by 2× and more.
  cpu(() => shapedRows(spec, [drop(999, media[0])], thetaDeg, 0.05));
  cpu(() => shapedRows(spec, media.map((m) => drop(998, m)), thetaDeg, 0.05));
  const tracedMs = median([0, 1, 2, 3, 4].map((k) => cpu(() => shapedRows({ ...spec, traceEveryIndex: true }, [drop(1000 + k, media[20])], thetaDeg, 0.05))));
  const allMs = median([0, 1, 2].map((k) => cpu(() => shapedRows(spec, media.map((m) => drop(1010 + k, m)), thetaDeg, 0.05))));
  return { tracedMs, interpolatedMs: Math.max(0, (allMs - INDEX_NODES * tracedMs) / media.length) };
}

const full = process.argv.includes("--full");
const machine = machineLine();
const date = benchDate();
const loadBefore = loadavg()[0];
const measured = [];
for (const w of full ? [P1, P4, P5] : [P1, P4]) measured.push(...(await benchProfile(w)));
const loadAfter = loadavg()[0];

const { tracedMs, interpolatedMs } = planeCpuMs();
const cpuOf = (c: PlaneCount) => c.traced * tracedMs + c.interpolated * interpolatedMs;
const rows = measured.map((r) => {
  const c = planeCount([P1, P4, P5].find((w) => w.name === r.name)!.body);
  return `| ${r.name} | ${c.traced} + ${c.interpolated} | ${c.before} | measured | ${r.coldMs.toFixed(0)} | ${r.coldCores.toFixed(2)} | ${r.warmMs === null ? "–" : r.warmMs.toFixed(1)} | ${(r.kernelBytes / 2 ** 20).toFixed(1)} |`;
});
for (const w of full ? [DEFAULT_SHAPED] : [DEFAULT_SHAPED, P5]) {
  const c = planeCount(w.body);
  rows.push(
    `| ${w.name} | ${c.traced} + ${c.interpolated} | ${c.before} | projected: planes × CPU per plane / 2 cores (before: ${((c.before * tracedMs) / 2).toFixed(0)} ms) | ${(cpuOf(c) / 2).toFixed(0)} | – | – | – |`,
  );
}
for (const r of rows) console.log(r);
writeMarkedSection("shapes", [
  "## Flattened drops beside the default profile",
  "",
  `Written by \`npm run bench:shapes\` (bench/shaped-profiles.ts${full ? ", --full" : ""}), ${date}; ${machine}; 2 worker threads; one-minute load`,
  `average ${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end` +
    (Math.max(loadBefore, loadAfter) > cpus().length ? " (above the core count: other processes shared the cores, so times are inflated)." : "."),
  "Cold and warm as in the table of whole profiles above (cold: empty kernel cache, threads warmed by another request; warm:",
  "median of 5 on the filled cache). Planes: traced + interpolated scattering planes as the service computes them now (a",
  `task holds one shape at every wavelength; each plane is traced at ${INDEX_NODES} refractive indices, each wavelength's row`,
  "blended from their rows with the bows aligned, lib/bow/aligned-blend.ts, or where a bow's constants are not polynomial in n",
  "from sweeps interpolated across the index, lib/rays/sweep-interpolation.ts; a traced plane traces every 8th pupil sample and",
  "fills the rest where its cubic is trusted: lib/rays/coarse-sweep.ts); \"before\": one traced plane per flattened radius node,",
  `wavelength and canting node, as before. CPU per plane, measured in this process on P4's drop over 600 bins: traced`,
  `${tracedMs.toFixed(0)} ms, interpolated ${interpolatedMs.toFixed(0)} ms (medians of 5 and 3 runs). Projected rows are planes × those times over 2 free cores, not measured`,
  "(`-- --full` measures Marshall–Palmer 25 mm/h). Goals (issue 13): default cold ≤ 1.5 s, warm ≤ 20 ms; Marshall–Palmer",
  "25 mm/h with equilibrium shapes cold ≤ 3 s.",
  "",
  "| workload | planes (traced + interpolated) | planes before | how | cold (ms) | cores busy | warm (ms) | kernel cache (MiB) |",
  "|---|---|---|---|---|---|---|---|",
  ...rows,
]);
