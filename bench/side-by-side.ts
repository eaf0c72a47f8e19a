// node dist/bench/side-by-side.js <old tree> <new tree> <rounds> <workload>…: cold profiles of flattened-drop workloads
// (bench/profile-once.ts: P4, P4-upright, S2-shapes, default-shapes, P5), or of the fog P2, with two builds on this machine, alternating which goes
// first each round, one process each; writes the "shaped-split" section of BENCHMARKS.md (P2 alone: "fog-cold"): each
// round's wall time and cores busy
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

const TITLES: Record<string, string> = {
  P4: "P4 (1 mm equilibrium drops, canting 7.5°, top of the bow)",
  "P4-upright": "P4 with upright drops (canting 0: one canting node)",
  "S2-shapes": "Marshall–Palmer 2 mm/h, equilibrium shapes (canting 7.5°), top of the bow, every 20 nm",
  P2: "P2 (fog, lognormal 10 µm, σg 1.4, full Mie, ψ 20–60° step 0.2°, 512 Mie sizes per decade)",
  "default-shapes": "the default profile with equilibrium shapes (Marshall–Palmer 2 mm/h, canting 7.5°, side of the bow)",
  P5: "P5 (Marshall–Palmer 25 mm/h, equilibrium shapes, canting 7.5°, side of the bow)",
};
const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];
const fog = workloads.every((w) => w === "P2");
const lines = [
  ...(fog
    ? [
        "## Full-Mie fog, cold: the main thread's and V8's share cut",
        "",
        `Written by bench/side-by-side.ts, ${benchDate()}, ${machineLine()}. Old: ${commit(oldTree)}; new: ${commit(newTree)} (the`,
        "spectral sum fed wavelength by wavelength as kernel tasks end, tasks looked up and sent wavelength by wavelength,",
        "no wrong-map deoptimisations of the worker's Mie code on fog after rain, cheaper planning). Cold P2 (empty kernel",
        "cache, 2 worker threads warmed by one other request, the default profile: rain, as npm run bench's P2 row), one",
        "process per build and round, the builds alternating which goes first.",
      ]
    : [
        "## Flattened drops: two builds side by side",
        "",
        `Written by bench/side-by-side.ts, ${benchDate()}, ${machineLine()}. Old: ${commit(oldTree)}; new: ${commit(newTree)}`,
        `(git log ${commit(oldTree)}..${commit(newTree)} says what changed). Cold profile (empty kernel cache, 2 worker threads warmed by one`,
        "other request, as npm run bench's P4 row), one process per build and round, the builds alternating which goes first.",
      ]),
  "Cores: the process's CPU time over the cold wall time, which other processes' work on the 2 cores lowers (one-minute",
  "load average in each table's heading; both builds saw it, round by round). Threads busy: the time the 2 worker threads",
  "held a kernel task over the wall time (bench/profile-once.ts), which that load does not lower: what balancing",
  fog
    ? "the main thread's serial work against the threads' changes. Tasks: kernel tasks sent to the pool."
    : "the parts changes. Tasks: kernel tasks sent to the pool.",
  "",
];
for (const workload of workloads) {
  type Run = { coldMs: number; coldCores: number; threadsBusy: number; tasks: number };
  const runs: Record<"old" | "new", Run[]> = { old: [], new: [] };
  const load0 = loadavg()[0];
  const table: string[] = [];
  for (let r = 0; r < rounds; r++) {
    const order: ("old" | "new")[] = r % 2 === 0 ? ["old", "new"] : ["new", "old"];
    for (const which of order) runs[which].push(run(which === "old" ? oldTree : newTree, workload) as unknown as Run);
    const [o, n] = [runs.old[r], runs.new[r]];
    const cells = (x: Run) => `${x.coldMs.toFixed(0)} | ${x.coldCores.toFixed(2)} | ${x.threadsBusy.toFixed(2)} | ${x.tasks}`;
    table.push(`| ${r + 1} | ${order[0]} | ${cells(o)} | ${cells(n)} |`);
    console.log(workload, table.at(-1));
  }
  const med = (which: "old" | "new", key: "coldMs" | "coldCores" | "threadsBusy") => median(runs[which].map((x) => x[key]));
  const medians = (which: "old" | "new") => `${med(which, "coldMs").toFixed(0)} | ${med(which, "coldCores").toFixed(2)} | ${med(which, "threadsBusy").toFixed(2)}`;
  const [a, b] = [run(oldTree, workload, "rows"), run(newTree, workload, "rows")];
  let worst = 0;
  for (const key of ["perpendicular", "parallel"]) {
    const x = a[key] as number[];
    const y = b[key] as number[];
    const peak = Math.max(...x.map(Math.abs));
    x.forEach((v, k) => (worst = Math.max(worst, Math.abs(v - y[k]) / peak)));
  }
  lines.push(
    `${TITLES[workload]}; load average ${load0.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end.`,
    "",
    "| round | first | old cold (ms) | old cores | old threads busy | old tasks | new cold (ms) | new cores | new threads busy | new tasks |",
    "|---|---|---|---|---|---|---|---|---|---|",
    ...table,
    `| median | | ${medians("old")} | | ${medians("new")} | |`,
    "",
    `New over old, cold wall: ${(med("new", "coldMs") / med("old", "coldMs")).toFixed(2)}. Spectral rows, largest |new − old| over their peak: ${worst.toExponential(1)}${fog ? " (the same arithmetic in the same order)" : " (rows differ as far as the builds' flattened-drop engines do: SHAPED_ENGINE_VERSION)"}.`,
    "",
  );
}
writeMarkedSection(fog ? "fog-cold" : "shaped-split", lines);
