// npm run bench:shaped-view: a 1280 × 720 camera view (PNG) of the Marshall–Palmer 25 mm/h shower with equilibrium
// shapes (canting 7.5°, default wavelengths), cold (empty kernel cache) and with its kernels cached, in one process
// with two kernel worker threads warmed by another view first. Issue 13's goals: ≤ 5 s cold, ≤ 1 s cached. A view
// of flattened drops needs the shower's rows at every arc node (every 5°) the frame spans, so the cold time grows
// with the arc the lens takes in: the frame is stated with the nodes it needed. Writes its section of BENCHMARKS.md.
import { performance } from "node:perf_hooks";
import { loadavg } from "node:os";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { builtInRenderers } from "../pipeline/jobs/renderers.js";
import { directionFromAzimuthElevation, azimuthElevationOf } from "../lib/view/vectors.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { median } from "./stats.js";

const WORKERS = 2;
const WARM_RUNS = 3;
// An invented shot: a 40° lens on the top of the primary, the sun 10° up at azimuth 240°, rain of 25 mm/h.
const SUN = { azimuthDeg: 240, elevationDeg: 10 };
const top = azimuthElevationOf(directionFromAzimuthElevation(SUN.azimuthDeg - 180, 42 - SUN.elevationDeg));
const camera = { yawDeg: top.azimuthDeg, pitchDeg: top.elevationDeg, widthPx: 1280, heightPx: 720, horizontalFovDeg: 40 };
const SHOWER = { kind: "marshall-palmer", rainRateMmPerH: 25, shape: { kind: "equilibrium" } };
const view = { scenario: { drops: SHOWER }, sun: SUN, camera };
// The threads' warm-up: the same frame with spherical drops (the drops' kernels then differ from the timed view's).
const warmUpView = { scenario: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25 } }, sun: SUN, camera };

const render = builtInRenderers.view.render;
const pool = createWorkerPool(WORKERS);
const kernels = new KernelService({ memoryBudgetBytes: 2 ** 32, compute: pool.compute, parallelism: WORKERS });
const deps = { kernels, maxTermAngles: Infinity };
const parse = (body: unknown) => builtInRenderers.view.body.parse(body);
const png = builtInRenderers.view.query.parse({ format: "png" });
const manifestQuery = builtInRenderers.view.query.parse({ format: "png", part: "manifest" });

const loadBefore = loadavg()[0];
await render(parse(warmUpView), png, deps);

const cpu0 = process.cpuUsage();
let t0 = performance.now();
const cold = await render(parse(view), png, deps);
const coldMs = performance.now() - t0;
const cpu = process.cpuUsage(cpu0);
const coldCores = (cpu.user + cpu.system) / 1000 / coldMs;
const warmMs: number[] = [];
for (let k = 0; k < WARM_RUNS; k++) {
  t0 = performance.now();
  await render(parse(view), png, deps);
  warmMs.push(performance.now() - t0);
}
const manifest = JSON.parse(String((await render(parse(view), manifestQuery, deps)).body)) as { arcPositions: { nodesDeg: number[] } };
await pool.close();
const loadAfter = loadavg()[0];
const nodes = manifest.arcPositions.nodesDeg;
const bytes = (cold.body as Buffer).length;
console.log(`cold ${(coldMs / 1000).toFixed(1)} s (cores ${coldCores.toFixed(2)}), cached ${warmMs.map((ms) => ms.toFixed(0)).join(", ")} ms; arc nodes ${nodes.join(", ")}; PNG ${bytes} bytes; load ${loadBefore.toFixed(2)} → ${loadAfter.toFixed(2)}`);
writeMarkedSection("shaped-view", [
  "## Flattened drops: a camera view of a heavy shower",
  "",
  `Written by \`npm run bench:shaped-view\` (bench/shaped-view.ts), ${benchDate()}; ${machineLine()}; ${WORKERS} worker threads warmed by the same`,
  `frame with spherical drops; one-minute load average ${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end. A 1280 × 720 PNG through`,
  "a 40° lens on the top of the primary (sun 10° up), Marshall–Palmer 25 mm/h with equilibrium shapes (canting 7.5°,",
  "default wavelengths). Cold: empty kernel cache; cached: the same view again (median of " + WARM_RUNS + "), the kernels in memory.",
  `Issue 13's goals: ≤ 5 s cold, ≤ 1 s cached. The frame spans the arc nodes ${nodes.join("°, ")}° (views blend the rows of arc`,
  "nodes every 5°): each is a shower's rows of its own, so a wider lens costs more nodes cold.",
  "",
  "| view | arc nodes | cold (s) | cores busy | cached (ms) |",
  "|---|---|---|---|---|",
  `| 1280 × 720, 40° lens, top of the bow | ${nodes.length} | ${(coldMs / 1000).toFixed(1)} | ${coldCores.toFixed(2)} | ${median(warmMs).toFixed(0)} |`,
]);
