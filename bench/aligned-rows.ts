// npm run bench:aligned-rows: flattened drops' rows blended across the refractive index (and the drop's shape) with
// their bows aligned (issue 13; lib/bow/aligned-blend.ts, lib/bow/shaped-rows.ts alignedNodeRows) against the
// reference path, every plane traced at each wavelength's own index and every radius with its own shape
// (ShapedRowSpec.traceEveryIndex, tasks cut per wavelength: bench/shaped-interpolation.ts perWavelength), and against
// the path before it (each wavelength's sweeps interpolated across n, indexBlend "sweeps"). All in one process on the
// same 2 worker threads; CPU time of the process and its threads (process.cpuUsage) per variant, so the ratios are
// same-run figures. Colour: CIEDE2000 per angle (Luo, Cui & Rigg 2001, via colorjs.io) on CIE 1931 XYZ scaled by the
// reference's peak Y over ψ 30–60°, after the sun's disc as the service computes profiles (bench/auto-presets.ts windowDeltaE).
// node dist/bench/aligned-rows.js [--showers] [--only=TEXT] [--steps=0.01,0.02] [--skip-sweeps] [--write[=SECTION]]
// (--only: the workloads whose name holds TEXT; --write: the aligned-rows section of BENCHMARKS.md, or the named one, so
// that runs of different workloads keep their own sections)

import { loadavg } from "node:os";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { windowDeltaE } from "./auto-presets.js";
import { perWavelength } from "./shaped-interpolation.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService, type KernelCompute } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { DEFAULT_DEFORMATION_STEP } from "../pipeline/compute/drop-shape-plan.js";
import { SHAPE_NODES_MAX_RADIUS_UM } from "../lib/bow/shaped-rows.js";

const EQUILIBRIUM_1MM = { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium" } };
const EQUILIBRIUM_2MM = { kind: "monodisperse", radiusUm: 2000, numberPerM3: 1000, shape: { kind: "equilibrium" } };
/** Showers every 20 nm, so that the reference (every radius its own shape, every wavelength traced) stays within minutes. */
const SHOWER_SPECTRAL = { fromNm: 380, toNm: 780, stepNm: 20 };
const shower = (rainRateMmPerH: number, cantingSdDeg: number, arcPositionDeg: number) => ({
  name: `Marshall–Palmer ${rainRateMmPerH} mm/h, equilibrium, canting ${cantingSdDeg}°, arc ${arcPositionDeg}° (20 nm)`,
  body: { spectral: SHOWER_SPECTRAL, drops: { kind: "marshall-palmer", rainRateMmPerH, shape: { kind: "equilibrium", cantingSdDeg } }, arcPositionDeg },
  shower: true,
});
const WORKLOADS = [
  { name: "P4: 1 mm equilibrium, canting 7.5°, top (arc 0°)", body: { drops: EQUILIBRIUM_1MM, arcPositionDeg: 0 }, shower: false },
  { name: "2 mm equilibrium, canting 7.5°, arc 45°", body: { drops: EQUILIBRIUM_2MM, arcPositionDeg: 45 }, shower: false },
  ...[2, 25].flatMap((rate) => [0, 7.5].flatMap((canting) => [0, 90].map((arc) => shower(rate, canting, arc)))),
];

/** The pool's compute with every flattened item's sweeps interpolated across n (the path before aligned rows). */
function sweepsPath(compute: KernelCompute): KernelCompute {
  return (task, signal) => compute({ ...task, items: task.items.map((item) => (item.shape ? { ...item, shape: { ...item.shape, indexBlend: "sweeps" as const } } : item)) }, signal);
}

async function cpuProfile(body: Record<string, unknown>, compute: KernelCompute, deformationStep = 0): Promise<{ result: ProfileResult; cpuMs: number }> {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute, parallelism: 2 });
  const cpu0 = process.cpuUsage();
  const result = await computeProfile(profileRequestSchema.parse({ sun: { elevationDeg: 10 }, ...body }), { kernels, limits: { maxTermAngles: Infinity } }, { deformationStep });
  const cpu = process.cpuUsage(cpu0);
  return { result, cpuMs: (cpu.user + cpu.system) / 1000 };
}

const args = process.argv.slice(2);
const steps = (args.find((a) => a.startsWith("--steps="))?.slice(8).split(",").map(Number) ?? []).filter((s) => s > 0);
const only = args.find((a) => a.startsWith("--only="))?.slice(7);
// --skip-sweeps: without the interpolated sweeps (the path before aligned rows); CPU ratios are then to the first path.
const skipSweeps = args.includes("--skip-sweeps");
const ratioTo = skipSweeps ? 0 : 1;
const load = loadavg()[0];
const pool = createWorkerPool(2);
const lines: string[] = [];
try {
  // Warm the threads (compile the tracer) first, so no variant pays for it.
  await cpuProfile({ drops: EQUILIBRIUM_1MM, spectral: { fromNm: 540, toNm: 560, stepNm: 20 }, angles: { fromDeg: 40, toDeg: 42, stepDeg: 0.05 } }, pool.compute);
  for (const w of WORKLOADS.filter((w) => (args.includes("--showers") ? true : !w.shower) && (!only || w.name.includes(only)))) {
    const reference = await cpuProfile(w.body, perWavelength(pool.compute));
    const variants: { what: string; run: { result: ProfileResult; cpuMs: number } }[] = [
      { what: w.shower ? "aligned rows, every radius its own shape" : "aligned rows", run: await cpuProfile(w.body, pool.compute) },
    ];
    if (!skipSweeps) variants.push({ what: "interpolated sweeps", run: await cpuProfile(w.body, sweepsPath(pool.compute)) });
    if (w.shower) {
      for (const step of steps) {
        const what = `aligned rows, shape nodes ${step} up to ${SHAPE_NODES_MAX_RADIUS_UM} µm${step === DEFAULT_DEFORMATION_STEP ? " (the service's default)" : ""}`;
        variants.push({ what, run: await cpuProfile(w.body, pool.compute, step) });
      }
    }
    for (const v of variants) {
      const d = windowDeltaE(reference.result, v.run.result);
      const line = `| ${w.name} | ${v.what} | ${d.worst.toFixed(3)} at ψ ${d.at?.toFixed(1) ?? "–"}° | ${d.mean.toFixed(4)} | ${v.run.cpuMs.toFixed(0)} / ${reference.cpuMs.toFixed(0)} | ${(v.run.cpuMs / variants[ratioTo].run.cpuMs).toFixed(2)} |`;
      console.log(line, `load ${loadavg()[0].toFixed(1)}`);
      lines.push(line);
    }
  }
} finally {
  await pool.close();
}
const write = args.find((a) => a === "--write" || a.startsWith("--write="));
if (write) {
  writeMarkedSection(write.includes("=") ? write.slice(8) : "aligned-rows", [
    `## Flattened drops: rows blended across the index and the shape with their bows aligned${only ? ` (${only})` : ""}`,
    "",
    `Written by \`node dist/bench/aligned-rows.js ${args.join(" ")}\` (bench/aligned-rows.ts), ${benchDate()}; ${machineLine()}; 2 worker threads; one-minute load`,
    `average ${load.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end. Sun 10°. Reference: every plane traced at each wavelength's own`,
    "index, every radius its own shape (traceEveryIndex). \"Aligned rows\" (the service's path): contexts at the traced indices, each",
    "bow's uniform table shifted so that its fold lands at the fold interpolated to the drop's index and the tables blended with",
    "Lagrange weights before they are squared (with shape nodes: also across deformation); groups whose constants or rows do not",
    "follow one polynomial in n traced at the drop's own index. \"Interpolated sweeps\": the path before aligned rows (every",
    "wavelength's sweeps interpolated across n; method \"geometric\" still takes it). ΔE2000 per angle over",
    "ψ 30–60° after the sun's disc, XYZ scaled by the reference's peak Y. CPU: the process and its threads in this run; ratio to the",
    `${skipSweeps ? "first path (every radius its own shape)" : "interpolated sweeps"} of the same workload in the same run. Shape nodes: equilibrium drops up to ${SHAPE_NODES_MAX_RADIUS_UM} µm blended`,
    "from the two shape nodes that bracket their deformation, their bows aligned (lib/bow/shaped-rows.ts), larger ones their own shape.",
    "",
    `| workload | path | worst ΔE2000 | mean ΔE2000 | CPU ms (path / reference) | CPU / ${skipSweeps ? "first path" : "interpolated sweeps"} |`,
    "|---|---|---|---|---|---|",
    ...lines,
  ]);
}
