// node dist/bench/shaped-parts.js (after npm run build): the CPU time of each part of a flattened-drop task split
// across threads (pipeline/kernels/canting-parts.ts: one part per canting node and order group), measured on P4
// (bench/profiles.ts) with every part run on this thread one after another, and the CPU of the whole task unsplit in
// the same process; and checks that the split rows equal the unsplit ones bit for bit. Used to
// set canting-parts.ts's ORDER_GROUP_COST (the order the parts are queued in); writes the
// "shaped-parts" section of BENCHMARKS.md.

import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { kernelRows } from "../lib/bow/kernel-rows.js";
import type { KernelTask } from "../pipeline/kernels/kernel-types.js";
import { SHAPED_ORDER_GROUPS } from "../lib/bow/shaped-rows.js";
import { P4 } from "./profiles.js";
import { loadavg } from "node:os";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { cpuTimed } from "./timing.js";

interface PartCpu {
  node: number;
  group: number;
  cpuMs: number;
}

const cpuMs = (fn: () => void): number => cpuTimed(fn).ms;

/** P4 cold on this thread; parallelism 2 splits its one shape in parts, 1 keeps it whole. */
async function run(parallelism: number, body: unknown): Promise<{ parts: PartCpu[]; totalMs: number; perp: Float64Array }> {
  const parts: PartCpu[] = [];
  let totalMs = 0;
  const kernels = new KernelService({
    memoryBudgetBytes: 2 ** 30,
    parallelism,
    compute: async (task: KernelTask) => {
      let result!: ReturnType<typeof kernelRows>;
      const ms = cpuMs(() => (result = kernelRows(task)));
      totalMs += ms;
      const item = task.items[0];
      if (item.cantingNode !== undefined) parts.push({ node: item.cantingNode, group: item.shape?.orderGroup ?? -1, cpuMs: ms });
      return result;
    },
  });
  const result = await computeProfile(profileRequestSchema.parse(body), { kernels, limits: { maxTermAngles: Infinity } });
  return { parts, totalMs, perp: result.spectral.perpendicular };
}

const date = benchDate();
// Warms the code on another sun elevation (other rows), then the whole task and the split one, twice each, alternating.
await run(2, { ...P4.body, sun: { elevationDeg: 11 } });
const split: Awaited<ReturnType<typeof run>>[] = [];
const whole: Awaited<ReturnType<typeof run>>[] = [];
for (let round = 0; round < 2; round++) {
  whole.push(await run(1, P4.body));
  split.push(await run(2, P4.body));
}
const same = split.every((s) => whole.every((w) => s.perp.length === w.perp.length && s.perp.every((v, k) => Object.is(v, w.perp[k]))));
const nodes = [...new Set(split[0].parts.map((p) => p.node))].sort((a, b) => a - b);
const groupTotals = (s: (typeof split)[number]) => SHAPED_ORDER_GROUPS.map((_, group) => s.parts.filter((p) => p.group === group).reduce((a, p) => a + p.cpuMs, 0));
const lines = [
  "## Flattened drops: the CPU of each part of a split task",
  "",
  `Written by bench/shaped-parts.ts, ${date}, ${machineLine()}, one-minute load average ${loadavg()[0].toFixed(1)}. P4 (1 mm`,
  "equilibrium drops, canting 7.5°, top of the bow, 41 wavelengths) cold, its one shape's task split in parts (one per",
  "canting node and order group, pipeline/kernels/canting-parts.ts) and each part run on this thread one after another",
  "(CPU ms, two runs); the whole task, unsplit, in the same process, alternating with the split one. Nodes: the place's",
  "canting rule's, mirror images merged (lib/bow/plane-canting-nodes.ts). These set ORDER_GROUP_COST, the order the",
  "parts are queued in.",
  "",
  `| canting node | ${SHAPED_ORDER_GROUPS.map((g) => `orders ${g.join(", ")}`).join(" | ")} | node total |`,
  `|---|${SHAPED_ORDER_GROUPS.map(() => "---").join("|")}|---|`,
  ...nodes.map((node) => {
    const cells = SHAPED_ORDER_GROUPS.map((_, group) => split.map((s) => s.parts.find((p) => p.node === node && p.group === group)!.cpuMs.toFixed(0)).join(" / "));
    const total = split.map((s) => s.parts.filter((p) => p.node === node).reduce((a, p) => a + p.cpuMs, 0).toFixed(0)).join(" / ");
    return `| ${node} | ${cells.join(" | ")} | ${total} |`;
  }),
  `| all | ${SHAPED_ORDER_GROUPS.map((_, g) => split.map((s) => groupTotals(s)[g].toFixed(0)).join(" / ")).join(" | ")} | ${split.map((s) => s.totalMs.toFixed(0)).join(" / ")} |`,
  "",
  `The whole task unsplit: ${whole.map((w) => w.totalMs.toFixed(0)).join(" / ")} ms CPU; split rows bit for bit those of the whole task: ${same ? "yes" : "NO"}.`,
];
writeMarkedSection("shaped-parts", lines);
