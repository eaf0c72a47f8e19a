// npm run bench:shape-index: what interpolating flattened drops' scattering planes across the refractive index costs
// in accuracy and saves in time (issue 13). Each workload is computed twice in this process, side by side on the same
// 2 worker threads: as the service computes it (each plane traced at the INDEX_NODES indices of the water, tracedIndices,
// every wavelength's interpolated from those: lib/rays/sweep-interpolation.ts) and with every task cut into one task
// per wavelength, each plane traced at its own index (ShapedRowSpec.traceEveryIndex). Compared: the spectral profile (|Δ| over the peak, per
// wavelength and angle) and the colour, CIEDE2000 per sample (Luo, Cui & Rigg 2001, via colorjs.io) on CIE 1931 XYZ
// scaled by the direct profile's peak Y, as bench/shape-colour.ts does. Times are wall times of cold profiles (fresh
// kernel caches) and CPU time of the process and its threads; the ratio is the measured gain.
// node dist/bench/shaped-interpolation.js [--write]   (--write: the shape-index section of BENCHMARKS.md)

import { pathToFileURL } from "node:url";
import { loadavg } from "node:os";
import { performance } from "node:perf_hooks";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { xyzOf } from "./auto-presets.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService, type KernelCompute } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import type { KernelTask, KernelTaskResult } from "../pipeline/kernels/kernel-types.js";
import { deltaE2000 } from "../lib/colour/delta-e.js";
import { INDEX_NODES, tracedIndices } from "../lib/bow/shaped-rows.js";
import { waterIndexSpan } from "../lib/water/index-range.js";

interface Workload {
  name: string;
  body: Record<string, unknown>;
}

const WORKLOADS: Workload[] = [
  { name: "1 mm equilibrium drops, canting 7.5°, top of the bow (arc 0°)", body: { drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium" } }, arcPositionDeg: 0 } },
  { name: "1 mm equilibrium drops, canting 7.5°, arc 45°", body: { drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium" } }, arcPositionDeg: 45 } },
  { name: "2 mm equilibrium drops, canting 7.5°, arc 45°", body: { drops: { kind: "monodisperse", radiusUm: 2000, numberPerM3: 1000, shape: { kind: "equilibrium" } }, arcPositionDeg: 45 } },
];

/** Items as the direct reference computes them: each flattened drop's plane traced at its own index. */
export function tracedDirectly(items: KernelTask["items"]): KernelTask["items"] {
  return items.map((item) => ({ ...item, medium: undefined, ...(item.shape ? { shape: { ...item.shape, traceEveryIndex: true } } : {}) }));
}

/** The pool's compute with every task of several wavelengths cut into one task per wavelength, each plane traced at its own index (the direct reference). */
export function perWavelength(compute: KernelCompute): KernelCompute {
  return async (task, signal) => {
    const media = [...new Set(task.items.map((item) => item.medium ?? task.medium))];
    if (media.length === 1) return compute({ ...task, medium: media[0], items: tracedDirectly(task.items) }, signal);
    const parts = await Promise.all(
      media.map((medium) => {
        const indices = task.items.flatMap((item, k) => ((item.medium ?? task.medium) === medium ? [k] : []));
        return compute({ ...task, medium, items: tracedDirectly(indices.map((k) => task.items[k])) }, signal).then((result) => ({ indices, result }));
      }),
    );
    const rows: KernelTaskResult["rows"] = new Array(task.items.length);
    let mieTermAngles = 0;
    for (const { indices, result } of parts) {
      indices.forEach((k, j) => (rows[k] = result.rows[j]));
      mieTermAngles += result.mieTermAngles;
    }
    return { rows, mieTermAngles };
  };
}

export interface ShapeIndexRow {
  name: string;
  worstOfPeak: number;
  worstDeltaE: number;
  meanDeltaE: number;
  interpolatedMs: number;
  directMs: number;
  interpolatedCpuMs: number;
  directCpuMs: number;
}

function compare(direct: ProfileResult, mine: ProfileResult): { worstOfPeak: number; worstDeltaE: number; meanDeltaE: number } {
  const a = direct.spectral;
  const b = mine.spectral;
  let peak = 0;
  let worst = 0;
  for (let k = 0; k < a.perpendicular.length; k++) peak = Math.max(peak, a.perpendicular[k] + a.parallel[k]);
  for (let k = 0; k < a.perpendicular.length; k++) worst = Math.max(worst, Math.abs(b.perpendicular[k] + b.parallel[k] - a.perpendicular[k] - a.parallel[k]) / peak);
  const ref = xyzOf(direct);
  const oth = xyzOf(mine);
  let peakY = 0;
  for (let i = 1; i < ref.length; i += 3) peakY = Math.max(peakY, ref[i]);
  const dE = deltaE2000(ref.map((v) => v / peakY), oth.map((v) => v / peakY));
  return { worstOfPeak: worst, worstDeltaE: Math.max(...dE), meanDeltaE: dE.reduce((s, d) => s + d, 0) / dE.length };
}

async function timed(body: Record<string, unknown>, compute: KernelCompute): Promise<{ result: ProfileResult; ms: number; cpuMs: number }> {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute, parallelism: 2 });
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const result = await computeProfile(profileRequestSchema.parse({ sun: { elevationDeg: 10 }, ...body }), { kernels, limits: { maxTermAngles: Infinity } });
  const cpu = process.cpuUsage(cpu0);
  return { result, ms: performance.now() - t0, cpuMs: (cpu.user + cpu.system) / 1000 };
}

export async function benchShapeIndex(): Promise<ShapeIndexRow[]> {
  const pool = createWorkerPool(2);
  const rows: ShapeIndexRow[] = [];
  try {
    // Warm the threads (compile the tracer) on a small request first, so neither side pays for it.
    await timed({ ...WORKLOADS[0].body, spectral: { fromNm: 540, toNm: 560, stepNm: 20 }, angles: { fromDeg: 40, toDeg: 42, stepDeg: 0.05 } }, pool.compute);
    for (const w of WORKLOADS) {
      const mine = await timed(w.body, pool.compute);
      const direct = await timed(w.body, perWavelength(pool.compute));
      const d = compare(direct.result, mine.result);
      rows.push({ name: w.name, ...d, interpolatedMs: mine.ms, directMs: direct.ms, interpolatedCpuMs: mine.cpuMs, directCpuMs: direct.cpuMs });
      console.log(
        `${w.name}: |Δ| ≤ ${d.worstOfPeak.toExponential(1)} of the peak, ΔE2000 worst ${d.worstDeltaE.toFixed(3)} mean ${d.meanDeltaE.toFixed(4)}; ` +
          `cold ${mine.ms.toFixed(0)} ms vs direct ${direct.ms.toFixed(0)} ms (×${(direct.ms / mine.ms).toFixed(1)}), CPU ${mine.cpuMs.toFixed(0)} vs ${direct.cpuMs.toFixed(0)} ms (×${(direct.cpuMs / mine.cpuMs).toFixed(1)}); load ${loadavg()[0].toFixed(1)}`,
      );
    }
  } finally {
    await pool.close();
  }
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const load = loadavg()[0];
  const rows = await benchShapeIndex();
  const nodes = tracedIndices({ kind: "equilibrium", cantingSdDeg: 0, sunElevationDeg: 0, arcPositionDeg: 0, rayOnly: false, indexSpan: waterIndexSpan({ temperatureC: 15, salinityPsu: 0 }) });
  if (process.argv.includes("--write")) {
    writeMarkedSection("shape-index", [
      "## Flattened drops: planes traced at a few refractive indices, interpolated to every wavelength",
      "",
      `Written by \`npm run bench:shape-index\` (bench/shaped-interpolation.ts), ${benchDate()}; ${machineLine()}; 2 worker threads;`,
      `one-minute load average ${load.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end. Default wavelengths (380–780 nm every`,
      `10 nm) and angles, sun 10°, monodisperse, fresh water at 15 °C. "Interpolated": as the service computes (planes traced at ${INDEX_NODES} indices,`,
      `${nodes[0].toFixed(4)}–${nodes[INDEX_NODES - 1].toFixed(4)}, Chebyshev nodes over this water's index at 360–830 nm; every`,
      "wavelength's sweeps interpolated, samples the error estimate does not trust traced again); \"direct\": the same",
      "requests with every task cut into one per wavelength, each plane traced at its own index, run next in the same process.",
      "Cold wall times on fresh caches, one run each, and the CPU time of the process and its threads (the machine is shared:",
      "the ratios are the figures to read). |Δ|: worst over",
      "wavelengths and angles of the spectral profile, over its peak. ΔE2000 per angle on XYZ scaled by the direct profile's peak Y.",
      "",
      "| workload | worst \\|Δ\\| / peak | worst ΔE2000 | mean ΔE2000 | interpolated cold (ms) | direct cold (ms) | ratio | CPU interpolated / direct (ms) | CPU ratio |",
      "|---|---|---|---|---|---|---|---|---|",
      ...rows.map(
        (r) =>
          `| ${r.name} | ${r.worstOfPeak.toExponential(1)} | ${r.worstDeltaE.toFixed(3)} | ${r.meanDeltaE.toFixed(4)} | ${r.interpolatedMs.toFixed(0)} | ${r.directMs.toFixed(0)} | ${(r.directMs / r.interpolatedMs).toFixed(1)} | ${r.interpolatedCpuMs.toFixed(0)} / ${r.directCpuMs.toFixed(0)} | ${(r.directCpuMs / r.interpolatedCpuMs).toFixed(1)} |`,
      ),
    ]);
  }
}
