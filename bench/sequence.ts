// npm run bench:sequence: a 100-frame 640 × 360 camera view sequence (PNG) with the kernels cached (one frame rendered
// first), in one process with two kernel worker threads; the goal is ≤ 60 s on 2 cores. Writes its section of
// BENCHMARKS.md with the one-minute load average, since on a shared machine the time says little without it.
import { performance } from "node:perf_hooks";
import { cpus, loadavg } from "node:os";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { builtInRenderers } from "../pipeline/jobs/renderers.js";
import { renderSequence } from "../pipeline/sequence/render-sequence.js";
import { asSequenceJob } from "../pipeline/sequence/sequence-job.js";
import type { JobRequest } from "../schemas/jobs.js";
import type { SequenceJobBody } from "../schemas/sequence.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";

const WORKERS = 2;
const FRAMES = 100;
const GOAL_S = 60;
// An invented lakeside at 46.8° N, 9.1° E: a June afternoon, the sun from 40° down to 20° in the span.
const REQUEST = {
  endpoint: "view",
  body: { sun: { at: { utc: "2026-06-21T14:00:00Z", latitudeDeg: 46.8, longitudeDeg: 9.1 } }, camera: { widthPx: 640, heightPx: 360, horizontalFovDeg: 100 } },
  query: { format: "png" },
  sequence: { fromUtc: "2026-06-21T14:00:00Z", toUtc: "2026-06-21T16:30:00Z", frames: FRAMES },
};

const machine = machineLine();
const date = benchDate();
const loadBefore = loadavg()[0];
const pool = createWorkerPool(WORKERS);
const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute });
const deps = { kernels, maxTermAngles: Infinity };
const job = asSequenceJob(REQUEST as unknown as JobRequest, builtInRenderers).body as SequenceJobBody;

// Kernels cached: the first frame alone, rendered once before the timing.
let t0 = performance.now();
await renderSequence({ ...job, sequence: { ...job.sequence, frames: 2 } }, builtInRenderers, deps);
const warmUpMs = performance.now() - t0;

// Where a frame's time goes: the time up to each progress update of the frame's render is put to the stage that
// update advances (kernel rows looked up, the spectral sum, colour, pixels shaded and encoded); the rest of the
// sequence's time (parsing each frame's body, hashing, the archive) is "sequence".
const stageMs = new Map<string, number>();
const add = (stage: string, ms: number) => stageMs.set(stage, (stageMs.get(stage) ?? 0) + ms);
const view = builtInRenderers.view;
const timedRegistry = {
  ...builtInRenderers,
  view: {
    ...view,
    render: (body: unknown, query: unknown, frameDeps: Parameters<typeof view.render>[2]) => {
      let last = performance.now();
      return view.render(body, query, {
        ...frameDeps,
        onProgress: (update) => {
          const now = performance.now();
          if (update.stage !== "done") add(update.stage, now - last);
          last = now;
          frameDeps.onProgress?.(update);
        },
      });
    },
  },
};

t0 = performance.now();
const cpu0 = process.cpuUsage();
const archive = await renderSequence(job, timedRegistry, deps);
const totalS = (performance.now() - t0) / 1000;
// The process's processor time (every thread, user and system): less at the mercy of other processes than the wall time.
const cpu = process.cpuUsage(cpu0);
const cpuS = (cpu.user + cpu.system) / 1e6;
await pool.close();
const loadAfter = loadavg()[0];
const renderMs = [...stageMs.values()].reduce((a, b) => a + b, 0);
add("sequence", totalS * 1000 - renderMs);
const perFrame = (stage: string) => ((stageMs.get(stage) ?? 0) / FRAMES).toFixed(0);
const STAGES = ["kernels", "spectral", "colour", "pixels", "sequence"];

console.log(`stages, ms per frame: ${STAGES.map((st) => `${st} ${perFrame(st)}`).join(", ")}`);
console.log(`sequence of ${FRAMES} views 640 × 360: ${totalS.toFixed(1)} s, CPU ${cpuS.toFixed(1)} s (${((totalS * 1000) / FRAMES).toFixed(0)} ms a frame), warm-up ${(warmUpMs / 1000).toFixed(1)} s, load ${loadBefore.toFixed(2)} → ${loadAfter.toFixed(2)}`);
writeMarkedSection("sequence", [
  "## A sequence of camera views",
  "",
  `Written by \`npm run bench:sequence\` (bench/sequence.ts), ${date}; ${machine}; ${WORKERS} worker threads; one-minute load average`,
  `${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end` +
    (Math.max(loadBefore, loadAfter) > cpus().length ? " (above the core count: other processes shared the cores, so times are inflated)." : "."),
  `${FRAMES} frames of a 640 × 360 rectilinear view (PNG, defaults otherwise), the sun at an invented place moving through 2.5 h of a`,
  "June afternoon; the kernels are cached first by a two-frame sequence of the same span (not timed). Goal: ≤ 60 s on 2 cores.",
  "",
  "CPU: the process's processor time over the run, every thread (user + system), which other processes inflate less than the wall time.",
  "",
  "| sequence | total (s) | per frame (ms) | CPU (s) | archive (MB) | goal met |",
  "| --- | ---: | ---: | ---: | ---: | --- |",
  `| ${FRAMES} × 640 × 360 views | ${totalS.toFixed(1)} | ${((totalS * 1000) / FRAMES).toFixed(0)} | ${cpuS.toFixed(1)} | ${(archive.body.length / 2 ** 20).toFixed(1)} | ${totalS <= GOAL_S ? "yes" : "no"} |`,
  "",
  "Where a frame's time goes (wall ms per frame, mean): kernels = the scene set up (position, camera rays, the ψ range the pixels",
  "need) and the cached kernel rows looked up; spectral = the sum over",
  "drops and the sun's disc per wavelength; colour; pixels = rays, ψ per pixel, shading and PNG encoding; sequence = the rest",
  "(each frame's body parsed, its hash, the archive).",
  "",
  `| ${STAGES.join(" | ")} |`,
  `| ${STAGES.map(() => "---:").join(" | ")} |`,
  `| ${STAGES.map(perFrame).join(" | ")} |`,
]);
