// Whole profiles with Lorenz–Mie rows of small drops on sub-lattices (lib/bow/mie-sub-lattice.ts, "adaptive") against
// rows at every lattice point ("lattice", the path before): cold times of P1, P2, P1_MIE and P3 (bench/profiles.ts),
// the two paths alternating in one run on this machine; the interpolation alone, TypeScript against WebAssembly
// (bench/sub-lattice-interpolation.ts); and how far the profiles move, as CIEDE2000 per sample over
// ψ 30–60° (bench/auto-presets.ts windowDeltaE: XYZ scaled by the old profile's peak Y) on every preset and the
// default profile, as given and with method "mie", and on fog P2. With the row-level interpolation error of
// bench/mie-sub-lattice.ts.
// node dist/bench/sub-lattice-profiles.js [--rounds=N] [--workloads=P1,P2,P1_MIE,P3] [--no-times] [--write]
// (--write: the sub-lattice section of BENCHMARKS.md)

import { pathToFileURL } from "node:url";
import { loadavg } from "node:os";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { benchProfile, P1, P1_MIE, P2, P3, type ProfileWorkload } from "./profiles.js";
import { median } from "./stats.js";
import { windowDeltaE } from "./auto-presets.js";
import { benchSubLattice } from "./mie-sub-lattice.js";
import { interpolationLine, timeInterpolation } from "./sub-lattice-interpolation.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { loadPresets } from "../pipeline/requests/presets.js";
import type { MieSampling } from "../lib/bow/mie-sub-lattice.js";
import { SUB_LATTICE_KAISER_BETA, SUB_LATTICE_PERIOD_FRACTION, SUB_LATTICE_POINTS } from "../lib/bow/mie-sub-lattice.js";

const SAMPLINGS: MieSampling[] = ["lattice", "adaptive"];

export interface SubLatticeTimeRow {
  name: string;
  /** Cold ms per round, old (lattice) and new (adaptive). */
  latticeMs: number[];
  adaptiveMs: number[];
  latticeTermAngles: number;
  adaptiveTermAngles: number;
}

/** Cold times on 2 workers, the two paths alternating (which goes first alternates from round to round). */
export async function timeSubLattice(workloads: ProfileWorkload[], rounds: number): Promise<SubLatticeTimeRow[]> {
  const rows = workloads.map((w): SubLatticeTimeRow => ({ name: w.name, latticeMs: [], adaptiveMs: [], latticeTermAngles: 0, adaptiveTermAngles: 0 }));
  for (let round = 0; round < rounds; round++) {
    for (const [k, w] of workloads.entries()) {
      const order = round % 2 === 0 ? SAMPLINGS : [...SAMPLINGS].reverse();
      for (const mieSampling of order) {
        const [r] = await benchProfile({ ...w, workers: [2], warm: false, disk: false }, { mieSampling });
        (mieSampling === "lattice" ? rows[k].latticeMs : rows[k].adaptiveMs).push(r.coldMs);
        if (mieSampling === "lattice") rows[k].latticeTermAngles = r.mieTermAngles;
        else rows[k].adaptiveTermAngles = r.mieTermAngles;
        console.log(`round ${round + 1} ${w.name.slice(0, 40)} ${mieSampling}: ${r.coldMs.toFixed(0)} ms, ${r.mieTermAngles.toExponential(2)} Mie term-angles`);
      }
    }
  }
  return rows;
}

export interface SubLatticeColourRow {
  name: string;
  worst: number;
  worstAtDeg: number | null;
  mean: number;
  /** Largest |Δβ| (β⊥ + β∥) over every wavelength and angle of the profile, over the old profile's peak β. */
  worstSpectral: number;
}

/** The profile cases compared: every preset and the default, as given and with method "mie", and fog P2. */
function colourCases(): { name: string; body: Record<string, unknown> }[] {
  const presets = [{ name: "default", body: {} as Record<string, unknown> }, ...[...loadPresets().values()].map((p) => ({ name: p.name, body: p.body as unknown as Record<string, unknown> }))];
  return [...presets, ...presets.map((p) => ({ name: `${p.name}, method mie`, body: { ...p.body, method: "mie" } })), { name: "P2 fog (full Mie, ripple averaged)", body: P2.body }];
}

export async function colourSubLattice(): Promise<SubLatticeColourRow[]> {
  const pool = createWorkerPool(2);
  const rows: SubLatticeColourRow[] = [];
  try {
    for (const c of colourCases()) {
      const results = [];
      for (const mieSampling of SAMPLINGS) {
        const kernels = new KernelService({ memoryBudgetBytes: 2 ** 32, compute: pool.compute, mieSampling });
        results.push(await computeProfile(profileRequestSchema.parse(c.body), { kernels, limits: { maxTermAngles: Infinity } }));
      }
      const [before, after] = results;
      const { worst, at, mean } = windowDeltaE(before, after);
      const y0 = before.spectral.perpendicular.map((v, k) => v + before.spectral.parallel[k]);
      const y1 = after.spectral.perpendicular.map((v, k) => v + after.spectral.parallel[k]);
      let peak = 0;
      let diff = 0;
      for (let k = 0; k < y0.length; k++) {
        peak = Math.max(peak, y0[k]);
        diff = Math.max(diff, Math.abs(y1[k] - y0[k]));
      }
      const row = { name: c.name, worst, worstAtDeg: at, mean, worstSpectral: diff / peak };
      rows.push(row);
      console.log(`${c.name}: worst ΔE2000 ${worst.toExponential(2)}, mean ${mean.toExponential(2)}, worst spectral |Δβ| / peak ${row.worstSpectral.toExponential(2)}`);
    }
  } finally {
    await pool.close();
  }
  return rows;
}

function fmt(v: number): string {
  return v === 0 ? "0" : v.toExponential(1);
}

async function main(): Promise<void> {
  const rounds = Number(process.argv.find((a) => a.startsWith("--rounds="))?.slice("--rounds=".length) ?? 3);
  const write = process.argv.includes("--write");
  const accuracy = [...benchSubLattice([SUB_LATTICE_PERIOD_FRACTION], [SUB_LATTICE_POINTS], 0, SUB_LATTICE_KAISER_BETA), ...benchSubLattice([SUB_LATTICE_PERIOD_FRACTION], [SUB_LATTICE_POINTS], 1e-8, SUB_LATTICE_KAISER_BETA)];
  const colour = await colourSubLattice();
  const named: Record<string, ProfileWorkload> = { P1, P2, P1_MIE, P3 };
  const chosen = process.argv.find((a) => a.startsWith("--workloads="))?.slice("--workloads=".length).split(",") ?? Object.keys(named);
  const times = process.argv.includes("--no-times") ? [] : await timeSubLattice(chosen.map((k) => named[k]), rounds);
  const interpolation = timeInterpolation(9);
  const lines = [
    "## Lorenz–Mie rows on sub-lattices",
    "",
    `Written by \`node dist/bench/sub-lattice-profiles.js --write\` (bench/sub-lattice-profiles.ts), ${benchDate()}; ${machineLine()}; load average`,
    `${loadavg()[0].toFixed(1)} at the end (a shared machine). Small drops' Lorenz–Mie rows on every c-th lattice point, c·h ≤ ${SUB_LATTICE_PERIOD_FRACTION} × 180°/N,`,
    `Kaiser-windowed sinc (${SUB_LATTICE_POINTS} points, β ${SUB_LATTICE_KAISER_BETA}) onto the lattice (lib/bow/mie-sub-lattice.ts), against every lattice point (the path before).`,
    "",
    `Row level (bench/mie-sub-lattice.ts; x = 20 to ${accuracy[0] ? "where c falls to 1" : "–"}, ψ 20–60°, 0.05° lattice): worst |interpolated − direct| / peak ${fmt(accuracy[0].worst)} (m = 1.333),`,
    `${fmt(accuracy[1].worst)} (m = 1.333 + 1e-8 i).`,
    "",
    interpolationLine(interpolation),
    "",
    "| profile | worst ΔE2000 (ψ 30–60°) | mean ΔE2000 | worst |Δβ| / peak β, all λ and ψ |",
    "|---|---|---|---|",
    ...colour.map((r) => `| ${r.name} | ${fmt(r.worst)} | ${fmt(r.mean)} | ${fmt(r.worstSpectral)} |`),
  ];
  if (times.length > 0) {
    lines.push(
      "",
      `Cold, 2 workers (threads warmed by another request, empty kernel cache), ${rounds} rounds, the two paths alternating; medians.`,
      "Where the term-angles are about equal (drops too large for a sub-lattice) both paths do the same work: their ratio is the run's noise.",
      "",
      "| workload | every lattice point (ms) | sub-lattices (ms) | ratio | Mie term-angles before → after |",
      "|---|---|---|---|---|",
      ...times.map((t) => {
        const a = median(t.latticeMs);
        const b = median(t.adaptiveMs);
        return `| ${t.name} | ${a.toFixed(0)} | ${b.toFixed(0)} | ${(a / b).toFixed(2)}× | ${t.latticeTermAngles.toExponential(2)} → ${t.adaptiveTermAngles.toExponential(2)} |`;
      }),
    );
  }
  console.log(lines.join("\n"));
  if (write) writeMarkedSection("sub-lattice", lines);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) await main();
