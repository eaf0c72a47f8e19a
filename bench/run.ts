// npm run bench: times the Mie kernel and whole profiles, prints the figures and rewrites BENCHMARKS.md.
import { writeFileSync } from "node:fs";
import { cpus, totalmem } from "node:os";
import { benchMie } from "./mie.js";
import { benchProfiles } from "./profiles.js";
import { repoPath } from "../server/resources.js";

const machine = `${cpus()[0]?.model ?? "unknown CPU"}, ${cpus().length} cores, ${Math.round(totalmem() / 2 ** 30)} GiB, Node ${process.version}`;
const date = new Date().toISOString().slice(0, 10);

console.log(`machine: ${machine}`);
const mie = benchMie();
for (const r of mie) {
  console.log(`Mie x=${r.x}: ${r.nTerms} terms × ${r.angles} angles, amplitudes ${r.amplitudesMs.toFixed(1)} ms, ${(r.termAnglesPerSecond / 1e6).toFixed(0)} M term-angles/s`);
}
const profiles = await benchProfiles();
for (const r of profiles) {
  console.log(`${r.name}, ${r.workers || "no"} workers: cold ${r.coldMs.toFixed(0)} ms, warm ${r.warmMs.toFixed(1)} ms`);
}

const lines = [
  "# Benchmarks",
  "",
  "Written by `npm run bench` (bench/run.ts). Medians after warm-up, one core, inside one Node process.",
  "Machines are noisy: compare ratios between rows of one run, not absolute times between runs.",
  "",
  `Machine: ${machine}. Date: ${date}.`,
  "",
  "## Lorenz–Mie kernel (water m = 1.333, 3,001 angles, Θ = 120–150° in 0.01° steps)",
  "",
  "| x | terms | coefficients (ms) | amplitudes (ms) | term-angles per second |",
  "|---|---|---|---|---|",
  ...mie.map((r) => `| ${r.x} | ${r.nTerms} | ${r.coefficientsMs.toFixed(2)} | ${r.amplitudesMs.toFixed(1)} | ${(r.termAnglesPerSecond / 1e6).toFixed(0)} M |`),
  "",
  "## Whole profiles through the kernel cache (in-process: no HTTP)",
  "",
  "Cold: an empty kernel cache. Warm: the same request again (median of 5), the kernel rows all in memory.",
  "Workers 0 computes on the calling thread.",
  "",
  "| workload | workers | cold (ms) | warm (ms) | Mie term-angles |",
  "|---|---|---|---|---|",
  ...profiles.map(
    (r) => `| ${r.name} | ${r.workers} | ${r.coldMs.toFixed(0)} | ${r.warmMs.toFixed(1)} | ${r.mieTermAngles.toExponential(2)} |`,
  ),
  "",
];
writeFileSync(repoPath("BENCHMARKS.md"), lines.join("\n"));
console.log("wrote BENCHMARKS.md");
