// node dist/bench/side-by-side.js <old tree> <new tree> <rounds> <workload>…: cold profiles of flattened-drop workloads
// (bench/profile-once.ts: P4, P4-upright) with two builds on this machine, alternating which goes first each round,
// one process each; writes the "shaped-split" section of BENCHMARKS.md: each round's wall time and cores busy
// (process CPU over wall), the medians, and the largest difference between the two builds' spectral rows relative to
// their peak. Both checkouts must be built (npm run build in each).

import { execFileSync, spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";
import { loadavg } from "node:os";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";

const [oldTree, newTree, roundsArg, ...workloads] = process.argv.slice(2);
const rounds = Number(roundsArg);
const once = fileURLToPath(new URL("./profile-once.js", import.meta.url));
const commit = (tree: string) => execFileSync("git", ["-C", tree, "log", "-1", "--format=%h"], { encoding: "utf8" }).trim();

function run(tree: string, workload: string, mode?: string): Record<string, number | number[]> {
  const out = spawnSync(process.execPath, [once, tree, workload, ...(mode ? [mode] : [])], { encoding: "utf8", maxBuffer: 2 ** 28 });
  if (out.status !== 0) throw new Error(`${tree}: ${out.stderr}`);
  return JSON.parse(out.stdout.trim().split("\n").at(-1)!);
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];
const lines = [
  "## Flattened drops: one shape's task split over both threads",
  "",
  `Written by bench/side-by-side.ts, ${benchDate()}, ${machineLine()}. Old: ${commit(oldTree)} (a task of one shape split`,
  `in two runs of consecutive canting nodes); new: ${commit(newTree)} (one part per canting node and order group, queued`,
  "largest first: pipeline/kernels/canting-parts.ts). Cold profile (empty kernel cache, 2 worker threads warmed by one",
  "other request, as npm run bench's P4 row), one process per build and round, the builds alternating which goes first.",
  "Cores: the process's CPU time over the cold wall time; both builds saw the same load, which other sessions' work",
  "put on the 2 cores (one-minute load average in each table's heading).",
  "",
];
for (const workload of workloads) {
  const runs: Record<"old" | "new", { coldMs: number; coldCores: number }[]> = { old: [], new: [] };
  const load0 = loadavg()[0];
  const table: string[] = [];
  for (let r = 0; r < rounds; r++) {
    const order: ("old" | "new")[] = r % 2 === 0 ? ["old", "new"] : ["new", "old"];
    for (const which of order) runs[which].push(run(which === "old" ? oldTree : newTree, workload) as { coldMs: number; coldCores: number });
    const [o, n] = [runs.old[r], runs.new[r]];
    table.push(`| ${r + 1} | ${order[0]} | ${o.coldMs.toFixed(0)} | ${o.coldCores.toFixed(2)} | ${n.coldMs.toFixed(0)} | ${n.coldCores.toFixed(2)} |`);
    console.log(workload, table.at(-1));
  }
  const med = (which: "old" | "new", key: "coldMs" | "coldCores") => median(runs[which].map((x) => x[key]));
  const [a, b] = [run(oldTree, workload, "rows"), run(newTree, workload, "rows")];
  let worst = 0;
  for (const key of ["perpendicular", "parallel"]) {
    const x = a[key] as number[];
    const y = b[key] as number[];
    const peak = Math.max(...x.map(Math.abs));
    x.forEach((v, k) => (worst = Math.max(worst, Math.abs(v - y[k]) / peak)));
  }
  lines.push(
    `${workload === "P4" ? "P4 (1 mm equilibrium drops, canting 7.5°, top of the bow)" : "P4 with upright drops (canting 0: one canting node)"}; load average ${load0.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end.`,
    "",
    "| round | first | old cold (ms) | old cores | new cold (ms) | new cores |",
    "|---|---|---|---|---|---|",
    ...table,
    `| median | | ${med("old", "coldMs").toFixed(0)} | ${med("old", "coldCores").toFixed(2)} | ${med("new", "coldMs").toFixed(0)} | ${med("new", "coldCores").toFixed(2)} |`,
    "",
    `New over old, cold wall: ${(med("new", "coldMs") / med("old", "coldMs")).toFixed(2)}. Spectral rows, largest |new − old| over their peak: ${worst.toExponential(1)} (the order groups' shares are added one by one: rounding).`,
    "",
  );
}
writeMarkedSection("shaped-split", lines);
