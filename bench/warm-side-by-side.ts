// node dist/bench/warm-side-by-side.js <old tree> <new tree> <rounds> [--write]: the default profile warm (kernel
// cache filled; issue 13's goal ≤ 20 ms) with two builds on this machine, one process each (bench/warm-once.ts),
// alternating which goes first each round; prints each round and the medians, and with --write the "warm-default"
// section of BENCHMARKS.md. Both checkouts must be built (npm run build in each).
import { execFileSync, spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";
import { loadavg } from "node:os";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { median } from "./stats.js";

const [oldTree, newTree, roundsArg] = process.argv.slice(2);
const rounds = Number(roundsArg);
const once = fileURLToPath(new URL("./warm-once.js", import.meta.url));
const commit = (tree: string) => execFileSync("git", ["-C", tree, "log", "-1", "--format=%h"], { encoding: "utf8" }).trim();

interface Once {
  warmMs: number;
  warmMinMs: number;
  rowsPathMs: number;
  rows: number[];
}
function run(tree: string): Once {
  const out = spawnSync(process.execPath, [once, tree], { encoding: "utf8", maxBuffer: 2 ** 28 });
  if (out.status !== 0) throw new Error(`${tree}: ${out.stderr}`);
  return JSON.parse(out.stdout.trim().split("\n").at(-1)!) as Once;
}

const loadBefore = loadavg()[0];
const table: { first: string; old: Once; new: Once }[] = [];
for (let r = 0; r < rounds; r++) {
  const oldFirst = r % 2 === 0;
  const a = run(oldFirst ? oldTree : newTree);
  const b = run(oldFirst ? newTree : oldTree);
  const [o, n] = oldFirst ? [a, b] : [b, a];
  table.push({ first: oldFirst ? "old" : "new", old: o, new: n });
  console.log(`round ${r + 1}: old ${o.warmMs.toFixed(1)} ms, new ${n.warmMs.toFixed(1)} ms; reading the rows: old ${o.rowsPathMs.toFixed(1)}, new ${n.rowsPathMs.toFixed(1)} ms`);
}
const loadAfter = loadavg()[0];
const peak = Math.max(...table[0].old.rows.map(Math.abs));
const rowsDelta = Math.max(...table[0].old.rows.map((v, k) => Math.abs(v - table[0].new.rows[k]))) / peak;
const oldMedian = median(table.map((t) => t.old.warmMs));
const newMedian = median(table.map((t) => t.new.warmMs));
const oldRowsMedian = median(table.map((t) => t.old.rowsPathMs));
const newRowsMedian = median(table.map((t) => t.new.rowsPathMs));
console.log(`medians: old ${oldMedian.toFixed(1)}, new ${newMedian.toFixed(1)} ms (${(newMedian / oldMedian).toFixed(2)}); reading the rows: old ${oldRowsMedian.toFixed(1)}, new ${newRowsMedian.toFixed(1)} ms (${(newRowsMedian / oldRowsMedian).toFixed(2)}); rows |Δ|/peak ${rowsDelta.toExponential(1)}`);
if (process.argv.includes("--write")) {
  writeMarkedSection("warm-default", [
    "## The default profile warm, two builds side by side",
    "",
    `Written by \`node dist/bench/warm-side-by-side.js\` (bench/warm-side-by-side.ts), ${benchDate()}; ${machineLine()}; old: ${commit(oldTree)}, new: ${commit(newTree)}`,
    `(git log old..new says what changed); one-minute load average ${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end. The default profile \`{}\``,
    "(Marshall–Palmer 2 mm/h, auto) on a filled kernel cache, 2 worker threads: per round and build one process, the median",
    "of 31 warm runs after one cold; the builds alternate which goes first. Issue 13's goal: warm ≤ 20 ms. Reading the",
    "rows: the same, with the kernel service's kept sums over drops cleared before each run (builds that keep them), as",
    "a request of the same drops over another window reads and sums its rows.",
    "",
    "| round | first | old warm (ms) | old fastest (ms) | old reading the rows (ms) | new warm (ms) | new fastest (ms) | new reading the rows (ms) |",
    "|---|---|---|---|---|---|---|---|",
    ...table.map(
      (t, r) =>
        `| ${r + 1} | ${t.first} | ${t.old.warmMs.toFixed(1)} | ${t.old.warmMinMs.toFixed(1)} | ${t.old.rowsPathMs.toFixed(1)} | ${t.new.warmMs.toFixed(1)} | ${t.new.warmMinMs.toFixed(1)} | ${t.new.rowsPathMs.toFixed(1)} |`,
    ),
    `| median | | ${oldMedian.toFixed(1)} | | ${oldRowsMedian.toFixed(1)} | ${newMedian.toFixed(1)} | | ${newRowsMedian.toFixed(1)} |`,
    "",
    `New over old, warm: ${(newMedian / oldMedian).toFixed(2)}; reading the rows: ${(newRowsMedian / oldRowsMedian).toFixed(2)}. Spectral rows, largest |new − old| over their peak: ${rowsDelta.toExponential(1)}.`,
  ]);
}
