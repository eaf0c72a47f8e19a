// node dist/bench/view-step.js [--write]: how fine a camera view's profile must be. A view draws each pixel from its
// profile by linear interpolation in ψ (lib/view/layer.ts); the profile's step sets its kernel lattice
// (lib/bow/kernel-grid.ts kernelStepFor), so a narrow lens whose pixels are smaller than the lattice's coarsest step
// makes every kernel row 5× (or 25×) longer. After the sun's disc (0.53°) has smoothed the bow, does that buy colour?
// Reference: the profile at the pixel's own step (a 40° lens 1280 px wide: 0.031°, lattice 0.01°; a 10° lens:
// 0.0078°, lattice 0.002°), as views computed it up to now. Candidates: steps 0.05° and 0.1° (lattice 0.05°),
// linearly interpolated to every reference sample, as the layer interpolates per pixel. Colour: CIEDE2000 (Luo, Cui &
// Rigg 2001, via colorjs.io) per sample on CIE 1931 XYZ, both scaled by the reference's peak Y (bench/auto-presets.ts).
// CPU: each profile cold (its own empty kernel cache, 2 worker threads warmed by one other profile) and cached (the
// same profile again, median of 3), in this process, one after another.
// --write: the view-step section of BENCHMARKS.md.

import { loadavg } from "node:os";
import { performance } from "node:perf_hooks";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { xyzDeltaE, xyzOf } from "./auto-presets.js";
import { median } from "./stats.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { kernelStepFor } from "../lib/bow/kernel-grid.js";

const WORKERS = 2;
const CACHED_RUNS = 3;
/** ψ range of the comparison: both bows and the dark band between them, with room for the secondary's outer side. */
const FROM_DEG = 34;
const TO_DEG = 58;
/** Candidates: a step and, where it is not the one the step chooses, a finer lattice (to tell the lattice's share from the interpolation's). */
const CANDIDATES: { stepDeg: number; latticeDeg?: number }[] = [{ stepDeg: 0.05, latticeDeg: 0.01 }, { stepDeg: 0.05 }, { stepDeg: 0.1 }];

interface Scenario {
  name: string;
  pixelDeg: number;
  body: Record<string, unknown>;
}

// Invented shots. Pixel sizes: a 40° lens 1280 px wide (2·atan(tan 20°)/1280 at the centre ≈ 0.0313°) and a 10° lens (0.0078°).
const LENS_40_PX_DEG = (2 * Math.atan(Math.tan((20 * Math.PI) / 180) / 640) * 180) / Math.PI / 2;
const LENS_10_PX_DEG = (2 * Math.atan(Math.tan((5 * Math.PI) / 180) / 640) * 180) / Math.PI / 2;
const SCENARIOS: Scenario[] = [
  { name: "rain, Marshall–Palmer 2 mm/h (the default drops), 40° lens", pixelDeg: LENS_40_PX_DEG, body: {} },
  { name: "drizzle, 0.25 mm drops (supernumeraries), 40° lens", pixelDeg: LENS_40_PX_DEG, body: { drops: { kind: "monodisperse", radiusUm: 250, numberPerM3: 1000 } } },
  { name: "drizzle, 0.25 mm drops, 10° lens", pixelDeg: LENS_10_PX_DEG, body: { drops: { kind: "monodisperse", radiusUm: 250, numberPerM3: 1000 } } },
  { name: "fine drizzle, 0.1 mm drops, 40° lens", pixelDeg: LENS_40_PX_DEG, body: { drops: { kind: "monodisperse", radiusUm: 100, numberPerM3: 1000 } } },
  {
    name: "flattened 1 mm drops, upright (no canting: the sharpest bows), top of the bow, 40° lens",
    pixelDeg: LENS_40_PX_DEG,
    body: { drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } }, arcPositionDeg: 0 },
  },
  {
    name: "flattened rain, Marshall–Palmer 25 mm/h, spheroids 0.9 (no canting), top of the bow, 40° lens",
    pixelDeg: LENS_40_PX_DEG,
    body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25, shape: { kind: "spheroid", axisRatio: 0.9, cantingSdDeg: 0 } }, arcPositionDeg: 0 },
  },
];

interface Timed {
  result: ProfileResult;
  coldMs: number;
  cachedMs: number;
}

const pool = createWorkerPool(WORKERS);
const limits = { maxTermAngles: Infinity };

async function timed(body: Record<string, unknown>, stepDeg: number, latticeDeg?: number): Promise<Timed> {
  const resolution = latticeDeg === undefined ? {} : { maxInternalStepDeg: latticeDeg };
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 32, compute: pool.compute, parallelism: WORKERS });
  const request = profileRequestSchema.parse({ ...body, sun: { elevationDeg: 10 }, angles: { fromDeg: FROM_DEG, toDeg: TO_DEG, stepDeg } });
  let t0 = performance.now();
  const result = await computeProfile(request, { kernels, limits }, resolution);
  const coldMs = performance.now() - t0;
  const cached: number[] = [];
  for (let k = 0; k < CACHED_RUNS; k++) {
    t0 = performance.now();
    await computeProfile(request, { kernels, limits }, resolution);
    cached.push(performance.now() - t0);
  }
  return { result, coldMs, cachedMs: median(cached) };
}

/** XYZ of a coarse profile at each of the reference's angles, linear in ψ (as lib/view/layer.ts draws pixels). */
function interpolatedXyz(coarse: ProfileResult, anglesDeg: Float64Array): Float64Array {
  const xyz = xyzOf(coarse);
  const a = coarse.spectral.anglesDeg;
  const step = a[1] - a[0];
  const out = new Float64Array(3 * anglesDeg.length);
  anglesDeg.forEach((psi, s) => {
    const t = (psi - a[0]) / step;
    const k = Math.min(a.length - 2, Math.max(0, Math.floor(t)));
    const f = t - k;
    for (let c = 0; c < 3; c++) out[3 * s + c] = (1 - f) * xyz[3 * k + c] + f * xyz[3 * (k + 1) + c];
  });
  return out;
}

interface Row {
  scenario: string;
  referenceStepDeg: number;
  referenceLatticeDeg: number;
  reference: Timed;
  candidates: { stepDeg: number; latticeDeg: number; timed: Timed; worst: number; at: number; mean: number }[];
}

const rows: Row[] = [];
const loadBefore = loadavg()[0];
try {
  await timed({}, 0.1); // warms the threads
  for (const s of SCENARIOS) {
    const reference = await timed(s.body, s.pixelDeg);
    const refXyz = xyzOf(reference.result);
    const angles = reference.result.spectral.anglesDeg;
    const row: Row = { scenario: s.name, referenceStepDeg: s.pixelDeg, referenceLatticeDeg: kernelStepFor(s.pixelDeg), reference, candidates: [] };
    for (const { stepDeg, latticeDeg } of CANDIDATES) {
      const t = await timed(s.body, stepDeg, latticeDeg);
      const d = xyzDeltaE(refXyz, interpolatedXyz(t.result, angles), angles);
      row.candidates.push({ stepDeg, latticeDeg: latticeDeg ?? kernelStepFor(stepDeg), timed: t, ...d });
      console.log(
        `${s.name}: step ${stepDeg}° (lattice ${latticeDeg ?? kernelStepFor(stepDeg)}°) against ${s.pixelDeg.toFixed(4)}°: worst ΔE2000 ${d.worst.toFixed(3)} at ψ ${d.at.toFixed(2)}°, mean ${d.mean.toFixed(4)}; ` +
          `cold ${t.coldMs.toFixed(0)} vs ${reference.coldMs.toFixed(0)} ms, cached ${t.cachedMs.toFixed(1)} vs ${reference.cachedMs.toFixed(1)} ms (load ${loadavg()[0].toFixed(1)})`,
      );
    }
    rows.push(row);
  }
} finally {
  await pool.close();
}
const loadAfter = loadavg()[0];

if (process.argv.includes("--write")) {
  writeMarkedSection("view-step", [
    "## Camera views: how fine the profile behind the pixels must be",
    "",
    `Written by \`node dist/bench/view-step.js --write\` (bench/view-step.ts), ${benchDate()}; ${machineLine()}; ${WORKERS} worker threads;`,
    `one-minute load average ${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end. Sun 10°, default wavelengths and sun disc, ψ ${FROM_DEG}–${TO_DEG}°.`,
    "Reference: the profile at the pixel's own step (as views took it before), on the kernel lattice that step",
    "chooses. Candidate: a coarser step, interpolated linearly to every reference sample (as pixels are drawn).",
    "Colour: CIEDE2000 per sample, XYZ of both scaled by the reference's peak Y. Cold: empty kernel cache; cached: the same",
    `profile again (median of ${CACHED_RUNS}); ratios: candidate over reference, the two measured one after the other in this run.`,
    "",
    "| scenario | reference step (lattice) | candidate step (lattice) | worst ΔE2000 (at ψ) | mean ΔE2000 | cold ms (ratio) | cached ms (ratio) |",
    "|---|---|---|---|---|---|---|",
    ...rows.flatMap((r) =>
      r.candidates.map(
        (c) =>
          `| ${r.scenario} | ${r.referenceStepDeg.toFixed(4)}° (${r.referenceLatticeDeg}°) | ${c.stepDeg}° (${c.latticeDeg}°) | ${c.worst.toFixed(3)} (${c.at.toFixed(2)}°) | ${c.mean.toFixed(4)} | ` +
          `${c.timed.coldMs.toFixed(0)} (${(c.timed.coldMs / r.reference.coldMs).toFixed(2)}) | ${c.timed.cachedMs.toFixed(1)} (${(c.timed.cachedMs / r.reference.cachedMs).toFixed(2)}) |`,
      ),
    ),
  ]);
}
