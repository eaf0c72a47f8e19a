// How far `auto` strays from full Lorenz–Mie on every preset (and the default profile), over ψ 30–60°: the
// measurement behind AUTO_MIE_BUDGET_TERM_ANGLES (lib/bow/engine-choice.ts). Per preset the full-Mie profile is
// computed once; auto at each budget then reuses its Mie rows from the kernel cache (only the Airy rows are new).
// Colour difference: CIEDE2000 (Luo, Cui & Rigg 2001, via colorjs.io) per sample on CIE 1931 XYZ of the radiance,
// both profiles divided by the Mie profile's peak Y, so a brightness error counts as well as a hue error.
// node dist/bench/auto-presets.js [budgets, comma-separated] [--only=preset,…] [--write]
// --write (at the service's budget only) rewrites fixtures/auto-engine/presets-vs-mie.json, which
// test/pipeline/compute/auto-presets.test.ts reads: the measured error of auto's choice on each preset.

import { pathToFileURL } from "node:url";
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { writeMarkedSection } from "./sections.js";
import { cpus, loadavg } from "node:os";
import { repoPath } from "../pipeline/config/resources.js";
import { performance } from "node:perf_hooks";
import { profileRequestSchema } from "../schemas/profile.js";
import { autoChoiceFor, computeProfile, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { loadPresets } from "../pipeline/requests/presets.js";
import { spectraToXyz } from "../lib/colour/tristimulus.js";
import { deltaE2000 } from "../lib/colour/delta-e.js";
import { AUTO_MAX_AIRY_SHARE, AUTO_MIE_BUDGET_TERM_ANGLES } from "../lib/bow/engine-choice.js";

export interface AutoPresetRow {
  preset: string;
  budget: number;
  /** auto's switch radius (Infinity: every drop by Mie). */
  airyFromUm: number;
  rule: string;
  worstDeltaE: number;
  worstAtDeg: number | null;
  meanDeltaE: number;
  autoMieTermAngles: number;
  mieMieTermAngles: number;
  mieColdMs: number;
}

export function xyzOf(r: ProfileResult): Float64Array {
  const { perpendicular, parallel } = r.spectral;
  return spectraToXyz(r.grid, perpendicular.map((v, k) => v + parallel[k]), r.request.observer);
}

/** CIEDE2000 per angle of XYZ `test` against `ref` (x, y, z per angle), both scaled by ref's peak Y: worst, its ψ, mean. */
export function xyzDeltaE(ref: Float64Array, test: Float64Array, anglesDeg: Float64Array): { worst: number; at: number; mean: number } {
  let peak = 0;
  for (let i = 1; i < ref.length; i += 3) peak = Math.max(peak, ref[i]);
  const dE = deltaE2000(ref.map((v) => v / peak), test.map((v) => v / peak));
  let worst = 0;
  let at = Number.NaN;
  dE.forEach((d, k) => {
    if (d > worst) [worst, at] = [d, anglesDeg[k]];
  });
  return { worst, at, mean: dE.reduce((s, d) => s + d, 0) / dE.length };
}

/**
 * CIEDE2000 per sample of test against ref over ψ 30–60° (the profiles' own range within it), both XYZ scaled by
 * ref's peak Y: the worst (and its ψ; null when every sample is equal) and the mean.
 */
export function windowDeltaE(ref: ProfileResult, test: ProfileResult): { worst: number; at: number | null; mean: number } {
  const r = xyzOf(ref);
  const t = xyzOf(test);
  let peak = 0;
  for (let i = 1; i < r.length; i += 3) peak = Math.max(peak, r[i]);
  const inWindow = Array.from(ref.spectral.anglesDeg, (a, i) => (a >= 30 - 1e-9 && a <= 60 + 1e-9 ? i : -1)).filter((i) => i >= 0);
  const pick = (x: Float64Array) => Float64Array.from(inWindow.flatMap((i) => [x[3 * i] / peak, x[3 * i + 1] / peak, x[3 * i + 2] / peak]));
  const dE = deltaE2000(pick(r), pick(t));
  let worst = 0;
  let at: number | null = null;
  dE.forEach((d, k) => {
    if (d > worst) [worst, at] = [d, ref.spectral.anglesDeg[inWindow[k]]];
  });
  return { worst, at, mean: dE.reduce((s, d) => s + d, 0) / dE.length };
}

export async function benchAutoPresets(budgets: number[] = [AUTO_MIE_BUDGET_TERM_ANGLES], workers = 2, only?: string[]): Promise<AutoPresetRow[]> {
  const pool = createWorkerPool(workers);
  const rows: AutoPresetRow[] = [];
  const presets = [{ id: "default", body: {} as Record<string, unknown> }, ...[...loadPresets().values()].map((p) => ({ id: p.name, body: p.body as unknown as Record<string, unknown> }))].filter(
    (p) => !only || only.includes(p.id),
  );
  try {
    for (const p of presets) {
      const kernels = new KernelService({ memoryBudgetBytes: 2 ** 32, compute: pool.compute });
      const opts = { kernels, limits: { maxTermAngles: Infinity } };
      const t0 = performance.now();
      const mie = await computeProfile(profileRequestSchema.parse({ ...p.body, method: "mie" }), opts);
      const mieColdMs = performance.now() - t0;
      for (const budget of budgets) {
        const auto = await computeProfile(profileRequestSchema.parse({ ...p.body, method: "auto" }), opts, { autoMieBudgetTermAngles: budget });
        const { worst, at, mean } = windowDeltaE(mie, auto);
        const row: AutoPresetRow = {
          preset: p.id,
          budget,
          airyFromUm: autoChoiceFor(auto.request, { autoMieBudgetTermAngles: budget })!.airyFromUm,
          rule: String((auto.meta.method as { rule?: string }).rule),
          worstDeltaE: worst,
          worstAtDeg: at,
          meanDeltaE: mean,
          autoMieTermAngles: auto.spectral.mieTermAngles,
          mieMieTermAngles: mie.spectral.mieTermAngles,
          mieColdMs,
        };
        rows.push(row);
        console.log(
          `${row.preset} budget ${budget.toExponential(1)}: worst ΔE2000 ${worst.toFixed(2)}${row.worstAtDeg === null ? "" : ` at ψ ${row.worstAtDeg.toFixed(2)}°`}, mean ${row.meanDeltaE.toFixed(3)}; auto ${row.autoMieTermAngles.toExponential(2)} Mie term-angles, full Mie ${row.mieMieTermAngles.toExponential(2)} (${(mieColdMs / 1000).toFixed(1)} s cold); ${row.rule}`,
        );
      }
    }
  } finally {
    await pool.close();
  }
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const write = process.argv.includes("--write");
  const list = process.argv.slice(2).find((a) => !a.startsWith("--"));
  // --write measures every preset: the fixture must cover them all.
  const only = write ? undefined : process.argv.find((a) => a.startsWith("--only="))?.slice("--only=".length).split(",");
  const rows = await benchAutoPresets(write || !list ? [AUTO_MIE_BUDGET_TERM_ANGLES] : list.split(",").map(Number), 2, only);
  if (write) {
    const fixture = {
      source: "bench/auto-presets.ts --write: auto against method mie on every preset and the default profile, ψ 30–60°, CIEDE2000 per sample on XYZ scaled by the Mie peak Y",
      measured: new Date().toISOString().slice(0, 10),
      budgetTermAngles: AUTO_MIE_BUDGET_TERM_ANGLES,
      presets: rows.map((r) => ({
        preset: r.preset,
        airyFromUm: Number.isFinite(r.airyFromUm) ? r.airyFromUm : null,
        worstDeltaE: Number(r.worstDeltaE.toFixed(3)),
        worstAtDeg: r.worstAtDeg,
        meanDeltaE: Number(r.meanDeltaE.toFixed(3)),
        fullMieTermAngles: r.mieMieTermAngles,
      })),
    };
    const table = [
      "## `auto` against full Lorenz–Mie on the presets",
      "",
      `Written by \`node dist/bench/auto-presets.js --write\` (bench/auto-presets.ts), ${fixture.measured}; ${cpus()[0]?.model ?? "unknown CPU"}, ${cpus().length} cores, Node ${process.version};`,
      `load average ${loadavg()[0].toFixed(1)} at the end (times are wall times on a shared machine). auto's Mie budget ${AUTO_MIE_BUDGET_TERM_ANGLES.toExponential(1)} term-angles`,
      `and at most ${100 * AUTO_MAX_AIRY_SHARE} % of the cross-section left to Airy theory (lib/bow/engine-choice.ts). CIEDE2000 per sample over ψ 30–60° (the preset's own range within it), XYZ of both profiles`,
      "scaled by the Mie profile's peak Y. Full Mie: method \"mie\" on 2 worker threads, cold.",
      "",
      "| preset | auto: Airy from (µm) | worst ΔE2000 | at ψ (°) | mean ΔE2000 | full-Mie term-angles | full Mie cold (s) |",
      "|---|---|---|---|---|---|---|",
      ...rows.map(
        (r) =>
          `| ${r.preset} | ${Number.isFinite(r.airyFromUm) ? r.airyFromUm.toFixed(0) : "– (all Mie)"} | ${r.worstDeltaE.toFixed(2)} | ${r.worstAtDeg === null ? "–" : r.worstAtDeg.toFixed(2)} | ${r.meanDeltaE.toFixed(3)} | ${r.mieMieTermAngles.toExponential(2)} | ${(r.mieColdMs / 1000).toFixed(1)} |`,
      ),
    ];
    writeMarkedSection("auto", table);
    const folder = join(repoPath("fixtures"), "auto-engine");
    mkdirSync(folder, { recursive: true });
    writeFileSync(join(folder, "presets-vs-mie.json"), JSON.stringify(fixture, null, 2) + "\n");
  }
}
