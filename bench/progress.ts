// npm run bench:progress: (1) the costs progress is weighted by (pipeline/progress/work-costs.ts), measured on one
// core; (2) a cold full-Mie shower (P3) on 2 worker threads with and without a progress listener, alternating, in
// one run; (3) the estimate of time left when the fraction first reaches 50 % against the time that was actually
// left. Prints the figures and writes them into BENCHMARKS.md between <!-- progress:start --> and <!-- progress:end -->.
import { performance } from "node:perf_hooks";
import { kernelRows, type KernelRowsInput } from "../lib/bow/kernel-rows.js";
import { blocksOf, latticeSpan, KERNEL_STEPS_DEG } from "../lib/bow/kernel-grid.js";
import { dropMedium } from "../lib/water/drop-medium.js";
import type { DropEngine } from "../lib/bow/volume-scattering.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { viewRequestSchema } from "../schemas/view.js";
import { angleCount } from "../schemas/angles.js";
import { computeProfile, PROFILE_STAGES, type ProfileResult } from "../pipeline/compute/profile.js";
import { encodeOverlay, prepareView } from "../pipeline/compute/view.js";
import { profileJson } from "../pipeline/render/profile-render.js";
import { encodePngStrip } from "../pipeline/encoders/png-strip.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createInlinePool, createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { ProgressMeter, type ProgressUpdate } from "../pipeline/progress/progress-meter.js";
import { COST_NS } from "../pipeline/progress/work-costs.js";
import { P3 } from "./profiles.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";

const SPAN = latticeSpan(30 - 0.27, 60 + 0.27, KERNEL_STEPS_DEG[0]);
const samples = SPAN.last - SPAN.first + 1;
const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];

function task(engine: DropEngine, radiiUm: number[]): KernelRowsInput {
  return {
    medium: dropMedium({ temperatureC: 15, salinityPsu: 0 }, 550),
    h: SPAN.h,
    items: radiiUm.map((radiusUm) => ({ radiusUm, engine, blocks: blocksOf(SPAN) })),
    within: { first: SPAN.first, last: SPAN.last },
  };
}

/** Median ms of fn over runs after one warm-up run. */
function timed(fn: () => void, runs = 5): number {
  fn();
  const times: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
  }
  return median(times);
}

/** Milliseconds each stage of a profile took, from the progress it reports (a stage ends when the next one starts). */
async function stageTimes(body: unknown, kernels: KernelService): Promise<{ result: ProfileResult; ms: Record<string, number> }> {
  const marks: { stage: string; at: number }[] = [];
  const t0 = performance.now();
  const progress = new ProgressMeter(PROFILE_STAGES, (u) => marks.push({ stage: u.stage, at: performance.now() }));
  const result = await computeProfile(profileRequestSchema.parse(body), { kernels, limits: { maxTermAngles: Infinity }, progress });
  const ms: Record<string, number> = {};
  let from = t0;
  for (const stage of PROFILE_STAGES) {
    const last = marks.filter((m) => m.stage === stage).at(-1);
    if (!last) continue;
    ms[stage] = last.at - from;
    from = last.at;
  }
  return { result, ms };
}

async function workCosts() {
  const mieRadii = [200, 500, 1000];
  let termAngles = 0;
  const mieMs = timed(() => void (termAngles = kernelRows(task("mie", mieRadii)).mieTermAngles), 3);
  const bowRadii = Array.from({ length: 40 }, (_, k) => 100 * 1.08 ** k);
  const airyMs = timed(() => void kernelRows(task("airy", bowRadii)));
  const rayMs = timed(() => void kernelRows(task("geometric", bowRadii)));
  // The later stages on a warm kernel cache: P3's drops (many radii) and the default profile.
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: createInlinePool().compute });
  // P3's drops under "auto" (Airy above 100 µm): the same radius nodes, kernels that are quick to fill.
  const p3 = { ...P3.body, method: "auto" };
  await stageTimes(p3, kernels);
  const warm: Record<string, number[]> = { spectral: [], colour: [] };
  let result: ProfileResult | undefined;
  for (let r = 0; r < 5; r++) {
    const run = await stageTimes(p3, kernels);
    result = run.result;
    warm.spectral.push(run.ms.spectral);
    warm.colour.push(run.ms.colour);
  }
  const request = result!.request;
  const nl = result!.grid.count;
  const angles = angleCount(request.angles);
  const radii = (result!.meta.radii as { nodes: number }).nodes;
  const h = (result!.meta.kernel as { angleStepDeg: number }).angleStepDeg;
  const span = latticeSpan(request.angles.fromDeg - request.sun.discDeg / 2, request.angles.toDeg + request.sun.discDeg / 2, h);
  const n = span.last - span.first + 1;
  const discSamples = Math.ceil(request.sun.discDeg / h) + 1;
  const jsonMs = timed(() => void JSON.stringify(profileJson(result!)));
  let pngMs = 0;
  {
    const times: number[] = [];
    for (let r = 0; r < 5; r++) {
      const t0 = performance.now();
      await encodePngStrip({ values: result!.colour.rgb, height: 32, bitDepth: 8, space: request.output.space });
      times.push(performance.now() - t0);
    }
    pngMs = median(times);
  }
  const view = viewRequestSchema.parse({});
  const prepared = await prepareView(view, "png", { kernels, limits: { maxTermAngles: Infinity } });
  const pixelTimes: number[] = [];
  for (let r = 0; r < 3; r++) {
    const t0 = performance.now();
    await encodeOverlay(prepared, "png");
    pixelTimes.push(performance.now() - t0);
  }
  const pixels = view.camera.widthPx * view.camera.heightPx;
  // The sum over drops and the disc convolution share one stage; their split follows the operation counts.
  const spectralNsPerOp = (median(warm.spectral) * 1e6) / (nl * n * (radii + discSamples));
  return {
    mieTermAngle: (mieMs * 1e6) / termAngles,
    airySample: (airyMs * 1e6) / (bowRadii.length * samples),
    raySample: (rayMs * 1e6) / (bowRadii.length * samples),
    sumSample: spectralNsPerOp,
    discSample: spectralNsPerOp,
    colourSample: (median(warm.colour) * 1e6) / (nl * angles),
    jsonAngle: (jsonMs * 1e6) / angles,
    pngAngle: (pngMs * 1e6) / angles,
    overlayPixel: (median(pixelTimes) * 1e6) / pixels,
  };
}

interface ShowerRun {
  ms: number;
  updates: ProgressUpdate[];
  /** Estimate of seconds left when the fraction first reached 50 %, and the seconds that were actually left. */
  atHalf: { estimateS: number | null; actualS: number } | null;
}

async function coldShower(pool: ReturnType<typeof createWorkerPool>, listen: boolean): Promise<ShowerRun> {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute, parallelism: pool.threads });
  const updates: ProgressUpdate[] = [];
  let half: { at: number; estimateS: number | null } | null = null;
  const t0 = performance.now();
  const progress = listen
    ? new ProgressMeter(PROFILE_STAGES, (u) => {
        updates.push(u);
        if (!half && u.fraction >= 0.5) half = { at: performance.now(), estimateS: u.secondsLeft };
      })
    : undefined;
  await computeProfile(profileRequestSchema.parse(P3.body), { kernels, limits: { maxTermAngles: Infinity }, progress });
  const end = performance.now();
  const h = half as { at: number; estimateS: number | null } | null;
  return { ms: end - t0, updates, atHalf: h ? { estimateS: h.estimateS, actualS: (end - h.at) / 1000 } : null };
}

const costs = await workCosts();
for (const [name, ns] of Object.entries(costs)) console.log(`${name}: ${ns.toPrecision(3)} ns (in use: ${COST_NS[name as keyof typeof COST_NS]})`);

const pool = createWorkerPool(2);
await computeProfile(profileRequestSchema.parse({ water: { temperatureC: 16 } }), {
  kernels: new KernelService({ memoryBudgetBytes: 2 ** 30, compute: pool.compute }),
  limits: { maxTermAngles: Infinity },
});
const without: number[] = [];
const withListener: ShowerRun[] = [];
for (let round = 0; round < 2; round++) {
  without.push((await coldShower(pool, false)).ms);
  withListener.push(await coldShower(pool, true));
  console.log(`round ${round + 1}: without ${without.at(-1)!.toFixed(0)} ms, with ${withListener.at(-1)!.ms.toFixed(0)} ms`);
}
await pool.close();
const withoutMs = median(without);
const withMs = median(withListener.map((r) => r.ms));
const halves = withListener.map((r) => r.atHalf!);
const distinct = withListener.map((r) => new Set(r.updates.map((u) => u.fraction.toFixed(3))).size);
console.log(`P3 cold, 2 workers: without ${withoutMs.toFixed(0)} ms, with a listener ${withMs.toFixed(0)} ms (${(100 * (withMs / withoutMs - 1)).toFixed(1)} %)`);
for (const h of halves) console.log(`at 50 %: estimated ${h.estimateS?.toFixed(2)} s left, actually ${h.actualS.toFixed(2)} s`);

writeMarkedSection("progress", [
  "## Progress: weights and cost",
  "",
  `Written by \`npm run bench:progress\` (bench/progress.ts), ${benchDate()}; ${machineLine()}.`,
  "",
  "Costs progress is weighted by (pipeline/progress/work-costs.ts holds these, rounded), one core, medians: Mie on a",
  "550 nm task of 200, 500 and 1000 µm drops over ψ 29.7–60.3° (0.05°); Airy and ray rows on 40 drops from 100 µm;",
  "spectral sum and colour on a warm profile of P3's drops (method auto) (the stage times as its progress reports them); encoding of its answer",
  "and of the default camera view.",
  "",
  "| piece | measured ns | in use |",
  "|---|---|---|",
  ...Object.entries(costs).map(([name, ns]) => `| ${name} | ${ns.toPrecision(3)} | ${COST_NS[name as keyof typeof COST_NS]} |`),
  "",
  "P3 (Marshall–Palmer 25 mm/h, full Mie) cold on 2 worker threads, alternating without and with a progress listener",
  "(pipeline/progress/progress-meter.ts; the listener keeps every update):",
  "",
  "| run | without listener (ms) | with listener (ms) | updates | distinct fractions | time left estimated at 50 % (s) | actually left (s) |",
  "|---|---|---|---|---|---|---|",
  ...withListener.map(
    (r, k) =>
      `| ${k + 1} | ${without[k].toFixed(0)} | ${r.ms.toFixed(0)} | ${r.updates.length} | ${distinct[k]} | ${r.atHalf?.estimateS?.toFixed(2) ?? "–"} | ${r.atHalf?.actualS.toFixed(2) ?? "–"} |`,
  ),
  "",
  `Median with a listener against without: ${(100 * (withMs / withoutMs - 1)).toFixed(1)} %.`,
]);
