// npm run bench:shape-nodes: what sharing traced planes across radii costs in colour and saves in planes (issue 13).
// Equilibrium drops' rows are blended from the two shape nodes that bracket their deformation 1 − q
// (lib/drops/shape/shape-nodes.ts), each at the drop's own size. Each workload is computed on the same 2 worker threads
// with every radius its own shape (deformation step 0, the direct reference) and on shape nodes at each step tried
// (ProfileResolution.deformationStep: the kernel tasks then hold all radii, split by wavelength over the threads); compared as CIEDE2000 per
// sample (Luo, Cui & Rigg 2001, via colorjs.io) on CIE 1931 XYZ scaled by the direct profile's peak Y over ψ 30–60°
// (bench/auto-presets.ts windowDeltaE). Planes: how many shapes the default profile with equilibrium shapes traces.
// node dist/bench/shape-nodes.js [--write]   (--write: the shape-nodes section of BENCHMARKS.md)

import { loadavg } from "node:os";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { windowDeltaE } from "./auto-presets.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { toDistribution } from "../pipeline/compute/profile.js";
import { planDropShapes } from "../pipeline/compute/drop-shape-plan.js";
import type { KernelCompute } from "../pipeline/kernels/kernel-service.js";
import { coldProfile } from "./cold-profile.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { latticeRadiusQuadrature } from "../lib/drops/lattice-quadrature.js";
import { shapeNodeWeights } from "../lib/drops/shape/shape-nodes.js";

/** Every 20 nm and no canting, so that the direct reference (one shape per radius) stays within minutes here. */
const CHEAP = { spectral: { fromNm: 380, toNm: 780, stepNm: 20 }, sun: { elevationDeg: 10 } };
const RAIN = { kind: "marshall-palmer", rainRateMmPerH: 2, shape: { kind: "equilibrium", cantingSdDeg: 0 } };
const WORKLOADS = [
  { name: "Marshall–Palmer 2 mm/h, equilibrium shapes, no canting, top of the bow (arc 0°)", body: { ...CHEAP, drops: RAIN, arcPositionDeg: 0 } },
  { name: "Marshall–Palmer 2 mm/h, equilibrium shapes, no canting, side of the bow (arc 90°)", body: { ...CHEAP, drops: RAIN, arcPositionDeg: 90 } },
];
const STEPS = [0.005, 0.01, 0.02];

/** Distinct traced shapes (shape nodes, or radii with step 0) of a request's flattened drops. */
export function shapeCount(body: Record<string, unknown>, step: number): { shapes: number; radii: number } {
  const request = profileRequestSchema.parse(body);
  const radii = latticeRadiusQuadrature(toDistribution(request.drops)).radiiUm;
  const plan = planDropShapes(request, radii);
  const flattened = Array.from(radii).filter((_, i) => plan.shapes[i]);
  return { shapes: new Set(flattened.flatMap((r) => shapeNodeWeights(r, step).map((n) => n.radiusUm))).size, radii: flattened.length };
}

/** A cold profile, equilibrium drops blended from shape nodes `step` apart (0: each radius its own shape). */
const run = (body: Record<string, unknown>, compute: KernelCompute, step: number) => coldProfile(body, compute, { deformationStep: step });

const load = loadavg()[0];
const pool = createWorkerPool(2);
const lines: string[] = [];
try {
  for (const w of WORKLOADS) {
    const direct = await run(w.body, pool.compute, 0);
    console.log(`${w.name}: direct ${direct.ms.toFixed(0)} ms, ${shapeCount(w.body, 0).shapes} shapes`);
    for (const step of STEPS) {
      const mine = await run(w.body, pool.compute, step);
      const d = windowDeltaE(direct.result, mine.result);
      const line = `| ${w.name} | ${step} | ${shapeCount(w.body, step).shapes} of ${shapeCount(w.body, 0).shapes} | ${d.worst.toFixed(3)} at ψ ${d.at?.toFixed(2) ?? "–"}° | ${d.mean.toFixed(4)} | ${mine.ms.toFixed(0)} / ${direct.ms.toFixed(0)} |`;
      console.log(line);
      lines.push(line);
    }
  }
} finally {
  await pool.close();
}
const DEFAULT_SHAPED = { drops: { kind: "marshall-palmer", rainRateMmPerH: 2, shape: { kind: "equilibrium" } } };
const counts = [0, ...STEPS].map((step) => `${step}: ${shapeCount(DEFAULT_SHAPED, step).shapes}`).join(", ");
console.log(`default profile with equilibrium shapes, shapes traced by step: ${counts}`);
if (process.argv.includes("--write")) {
  writeMarkedSection("shape-nodes", [
    "## Flattened drops: radii sharing the planes of shape nodes",
    "",
    `Written by \`npm run bench:shape-nodes\` (bench/shape-nodes.ts), ${benchDate()}; ${machineLine()}; 2 worker threads; one-minute`,
    `load average ${load.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end. Equilibrium drops' rows blended linearly from the`,
    "two shape nodes that bracket their deformation 1 − q (lib/drops/shape/shape-nodes.ts; each node's row at the drop's own size",
    "parameter) against every radius traced with its own shape, in the same process. 380–780 nm every 20 nm, sun 10°, no",
    "canting (to keep the reference within minutes). ΔE2000 per angle over ψ 30–60° on XYZ scaled by the direct profile's peak Y.",
    `Shapes traced by the default profile with equilibrium shapes (Marshall–Palmer 2 mm/h), by step: ${counts} (0: one per radius node);`,
    "each shape is 5 canting nodes × (5 traced + 41 interpolated) planes.",
    "",
    "| workload | deformation step | shapes traced | worst ΔE2000 | mean ΔE2000 | cold ms (nodes / direct) |",
    "|---|---|---|---|---|---|",
    ...lines,
  ]);
}
