// npm run bench:rotation-noise: the sampling noise of the canting mean by rotation (lib/bow/canting-rotation.ts) as a
// colour difference on whole showers, by pupil step (issue 13). Equilibrium drops above 1 mm canted by 2° or more take
// the mean over a grid of rays through the upright drop's pupil, each elevation's grid turned and shifted by
// low-discrepancy sequences; another draw of those turns and shifts (RotationSetup.grid.draw) is an equally good
// sampling, so two draws differ by the sampling noise alone. Each workload is computed twice per pupil step on the same
// 2 worker threads with cold caches and compared as CIEDE2000 per sample (Luo, Cui & Rigg 2001, via colorjs.io) on CIE
// 1931 XYZ scaled by the first draw's peak Y over ψ 30–60° (bench/auto-presets.ts windowDeltaE).
// node dist/bench/rotation-noise.js [--write] [--steps=0.02,0.014]   (--write: the rotation-noise section of BENCHMARKS.md)

import { loadavg } from "node:os";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { windowDeltaE } from "./auto-presets.js";
import type { KernelCompute } from "../pipeline/kernels/kernel-service.js";
import { coldProfile } from "./cold-profile.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { ROTATION_ELEVATIONS_PER_SD, ROTATION_PUPIL_STEP } from "../lib/bow/canting-rotation.js";

/** Every 20 nm, to keep four cold profiles per workload and step within minutes here. */
const LIGHT = { spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
const SHOWER = { kind: "marshall-palmer", rainRateMmPerH: 25, shape: { kind: "equilibrium" } };
const WORKLOADS = [
  { name: "Marshall–Palmer 25 mm/h, equilibrium shapes (canting 7.5°), sun 10°, top of the bow (arc 0°)", body: { ...LIGHT, sun: { elevationDeg: 10 }, drops: SHOWER, arcPositionDeg: 0 } },
  { name: "Marshall–Palmer 25 mm/h, equilibrium shapes (canting 7.5°), sun 10°, arc 45°", body: { ...LIGHT, sun: { elevationDeg: 10 }, drops: SHOWER, arcPositionDeg: 45 } },
  { name: "Marshall–Palmer 25 mm/h, equilibrium shapes (canting 7.5°), sun 30°, side of the bow (arc 90°)", body: { ...LIGHT, sun: { elevationDeg: 30 }, drops: SHOWER, arcPositionDeg: 90 } },
];
const stepsArg = process.argv.find((a) => a.startsWith("--steps="));
const STEPS = stepsArg ? stepsArg.slice(8).split(",").map(Number) : [ROTATION_PUPIL_STEP, 0.014];

/** A cold profile with the rotation's pupil at `pupilStep` and its grids' turns of `draw`. */
const run = (body: Record<string, unknown>, compute: KernelCompute, pupilStep: number, draw: number) =>
  coldProfile(body, compute, { rotationGrid: { pupilStep, elevationsPerSd: ROTATION_ELEVATIONS_PER_SD, draw } });

const load = loadavg()[0];
const pool = createWorkerPool(2);
const lines: string[] = [];
try {
  for (const w of WORKLOADS) {
    for (const step of STEPS) {
      const first = await run(w.body, pool.compute, step, 0);
      const second = await run(w.body, pool.compute, step, 1);
      const d = windowDeltaE(first.result, second.result);
      const which = step === ROTATION_PUPIL_STEP ? " (the service's)" : "";
      const line = `| ${w.name} | ${step}${which} | ${d.worst.toFixed(3)} at ψ ${d.at?.toFixed(2) ?? "–"}° | ${d.mean.toFixed(4)} | ${first.ms.toFixed(0)} / ${second.ms.toFixed(0)} |`;
      console.log(line);
      lines.push(line);
    }
  }
} finally {
  await pool.close();
}
if (process.argv.includes("--write")) {
  writeMarkedSection("rotation-noise", [
    "## Flattened drops: the canting mean by rotation's sampling noise, in colour",
    "",
    `Written by \`npm run bench:rotation-noise\` (bench/rotation-noise.ts), ${benchDate()}; ${machineLine()}; 2 worker threads; one-minute`,
    `load average ${load.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end. Each workload twice per pupil step, with two`,
    "draws of the turns and shifts of the rotation's pupil grids (RotationSetup.grid.draw): two equally good samplings, whose",
    "difference is the sampling noise alone. 380–780 nm every 20 nm. ΔE2000 per angle over ψ 30–60° on XYZ scaled by the",
    "first draw's peak Y. Cold times of the whole profile (drops up to 1 mm as the service takes them).",
    "",
    "| workload | pupil step at the tilts' mode (growing away from it: rotationPupilStep) | worst ΔE2000 between draws | mean ΔE2000 | cold ms (draw 0 / draw 1) |",
    "|---|---|---|---|---|",
    ...lines,
  ]);
}
