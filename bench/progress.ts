// npm run bench:progress: (1) the costs progress is weighted by (pipeline/progress/work-costs.ts), measured on one
// core, each against its weight in use, flagged beyond 2×; (2) what a progress listener costs a whole warm request
// (every row cached, so counting is largest against the work), many alternating pairs, and the share of its CPU
// samples in the progress code under V8's profiler; (3) a cold full-Mie shower on
// 2 worker threads with and without a listener, alternating rounds, with how evenly the fraction rose and the time
// left estimated at 50 % against the time actually left. Prints the figures and writes them into BENCHMARKS.md
// between <!-- progress:start --> and <!-- progress:end -->.
// `-- --counting-only`: only (2), printed. `-- --smoke`: tiny workloads to check the script runs, printed, not written.
import { performance } from "node:perf_hooks";
import { Session } from "node:inspector/promises";
import { kernelRows, type KernelRowsInput } from "../lib/bow/kernel-rows.js";
import { blocksOf, latticeSpan, KERNEL_STEPS_DEG, type LatticeSpan } from "../lib/bow/kernel-grid.js";
import { dropMedium } from "../lib/water/drop-medium.js";
import type { DropEngine } from "../lib/bow/volume-scattering.js";
import { INDEX_NODES, quantiseSpec, type ShapedRowSpec } from "../lib/bow/shaped-rows.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { viewRequestSchema } from "../schemas/view.js";
import { stripQuerySchema } from "../schemas/formats.js";
import { angleCount } from "../schemas/angles.js";
import { computeProfile, PROFILE_STAGES, type ProfileResult } from "../pipeline/compute/profile.js";
import { encodeOverlay, prepareView, renderPrepared } from "../pipeline/compute/view.js";
import { profileJson, renderProfile } from "../pipeline/render/profile-render.js";
import { encodePngStrip } from "../pipeline/encoders/png-strip.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createInlinePool, createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { ProgressMeter, type ProgressUpdate } from "../pipeline/progress/progress-meter.js";
import { throttledProgress } from "../pipeline/progress/throttled-progress.js";
import { COST_NS, WEIGHT_DRIFT_LIMIT, weightDrift, type WorkPiece } from "../pipeline/progress/work-costs.js";
import { P3 } from "./profiles.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { median, percentSpread, spread } from "./stats.js";

const smoke = process.argv.includes("--smoke");
const countingOnly = process.argv.includes("--counting-only");

/** The cold shower: P3's drops and engine at 20 nm (21 wavelengths), so that five pairs of rounds fit in about a minute. */
const SHOWER = smoke
  ? { drops: { kind: "marshall-palmer", rainRateMmPerH: 25 }, method: "mie", spectral: { fromNm: 400, toNm: 700, stepNm: 20 }, angles: { fromDeg: 40, toDeg: 43, stepDeg: 0.1 } }
  : { ...P3.body, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
const SHOWER_NAME = smoke ? "smoke: Marshall–Palmer 25 mm/h, full Mie, ψ 40–43°, 400–700 nm at 20 nm" : "P3 (Marshall–Palmer 25 mm/h, full Mie) at 20 nm (21 wavelengths)";
/** The warm request: P3's drops under auto (the same radius nodes as full Mie; quick to fill the cache with). */
const WARM = smoke ? { ...P3.body, method: "auto", spectral: { fromNm: 400, toNm: 700, stepNm: 20 } } : { ...P3.body, method: "auto" };
const COLD_ROUNDS = smoke ? 1 : 5;
const WARM_PAIRS = smoke ? 4 : 60;
const RUNS = smoke ? 1 : 5;

const SPAN = latticeSpan(30 - 0.27, 60 + 0.27, KERNEL_STEPS_DEG[0]);
const FINE_SPAN = latticeSpan(30 - 0.27, 60 + 0.27, KERNEL_STEPS_DEG[1]);
const samplesIn = (span: LatticeSpan) => span.last - span.first + 1;
const samples = samplesIn(SPAN);

function task(engine: DropEngine, radiiUm: number[], span = SPAN, shape?: ShapedRowSpec): KernelRowsInput {
  return {
    medium: dropMedium({ temperatureC: 15, salinityPsu: 0 }, 550),
    h: span.h,
    items: radiiUm.map((radiusUm) => ({ radiusUm, engine, blocks: blocksOf(span), shape })),
    within: { first: span.first, last: span.last },
  };
}

/** Median ms of fn over runs after one warm-up run. */
function timed(fn: () => void, runs = RUNS): number {
  fn();
  const times: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
  }
  return median(times);
}

async function timedAsync(fn: () => Promise<unknown>, runs = RUNS): Promise<number> {
  const times: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    await fn();
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

/**
 * A flattened drop's plane: one equilibrium drop about 2 mm without canting (one plane) at 0.05° and at 0.01°; the
 * fixed cost per plane and the cost per bin follow from the two lengths (a straight line through them). Each run
 * takes another radius (2 mm + 1 µm per run), so that no run finds another's planes. Then the same drop at
 * INTERPOLATED_WAVELENGTHS wavelengths in one task: INDEX_NODES traced planes and that many interpolated ones
 * (lib/rays/sweep-interpolation.ts); the interpolated plane's cost is what the task takes beyond the traced ones.
 */
function shapedPlaneCosts(): { shapedPlane: number; shapedPlaneSample: number; shapedInterpolatedPlane: number } {
  const spec = quantiseSpec({ kind: "equilibrium", cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 90, rayOnly: false });
  const runs = smoke ? 1 : 3;
  let radiusUm = 2000;
  // One plane traced at the drop's own index (a task of the service traces INDEX_NODES fixed ones and interpolates).
  const direct = { ...spec, traceEveryIndex: true };
  const coarseMs = timed(() => void kernelRows(task("airy", [radiusUm++], SPAN, direct)), runs);
  const fineMs = timed(() => void kernelRows(task("airy", [radiusUm++], FINE_SPAN, direct)), runs);
  const perBinNs = ((fineMs - coarseMs) * 1e6) / (samplesIn(FINE_SPAN) - samples);
  if (perBinNs <= 0) console.log(`flattened-drop plane: ${coarseMs.toFixed(1)} ms at ${samples} bins, ${fineMs.toFixed(1)} ms at ${samplesIn(FINE_SPAN)}: no cost per bin to fit`);
  const spectrum = (radius: number): KernelRowsInput => {
    const one = task("airy", [radius], SPAN, spec);
    const items = Array.from({ length: INTERPOLATED_WAVELENGTHS }, (_, l) => ({ ...one.items[0], medium: dropMedium({ temperatureC: 15, salinityPsu: 0 }, 400 + 30 * l) }));
    return { ...one, items };
  };
  const spectrumMs = timed(() => void kernelRows(spectrum(radiusUm++)), runs);
  const interpolatedNs = ((spectrumMs - INDEX_NODES * coarseMs) * 1e6) / INTERPOLATED_WAVELENGTHS;
  return { shapedPlane: coarseMs * 1e6 - Math.max(0, perBinNs) * samples, shapedPlaneSample: Math.max(0, perBinNs), shapedInterpolatedPlane: Math.max(0, interpolatedNs) };
}

/** Wavelengths of the task that prices an interpolated plane: 400–700 nm every 30 nm. */
const INTERPOLATED_WAVELENGTHS = 11;

async function workCosts(): Promise<Record<WorkPiece, number>> {
  const mieRadii = smoke ? [200] : [200, 500, 1000];
  let termAngles = 0;
  const mieMs = timed(() => void (termAngles = kernelRows(task("mie", mieRadii)).mieTermAngles), smoke ? 1 : 3);
  const bowRadii = Array.from({ length: 40 }, (_, k) => 100 * 1.08 ** k);
  const airyMs = timed(() => void kernelRows(task("airy", bowRadii)));
  const rayMs = timed(() => void kernelRows(task("geometric", bowRadii)));
  const shaped = shapedPlaneCosts();
  // The later stages on a warm kernel cache: P3's drops (many radii) and the default profile.
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: createInlinePool().compute });
  // P3's drops under "auto" (Airy above 100 µm): the same radius nodes, kernels that are quick to fill.
  await stageTimes(WARM, kernels);
  const warm: Record<string, number[]> = { spectral: [], colour: [] };
  let result: ProfileResult | undefined;
  for (let r = 0; r < RUNS; r++) {
    const run = await stageTimes(WARM, kernels);
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
  const n = samplesIn(span);
  const discSamples = Math.ceil(request.sun.discDeg / h) + 1;
  const jsonMs = timed(() => void JSON.stringify(profileJson(result!)));
  const pngMs = await timedAsync(() => encodePngStrip({ values: result!.colour.rgb, height: 32, bitDepth: 8, space: request.output.space }));
  const view = viewRequestSchema.parse({});
  const prepared = await prepareView(view, "png", { kernels, limits: { maxTermAngles: Infinity } });
  const pixelMs = await timedAsync(() => encodeOverlay(prepared, "png"), smoke ? 1 : 3);
  const pixels = view.camera.widthPx * view.camera.heightPx;
  // Rough water: the same view drawn with 10 m/s wind and with calm water; the difference is the glitter groups' share.
  const calmWater = await prepareView(viewRequestSchema.parse({ waterSurface: { kind: "calm" } }), "png", { kernels, limits: { maxTermAngles: Infinity } });
  const roughWater = await prepareView(viewRequestSchema.parse({ waterSurface: { kind: "rough", windSpeedMs: 10 } }), "png", { kernels, limits: { maxTermAngles: Infinity } });
  const groups = roughWater.scene.water!.rough!.surfaces.length;
  const roughMs = timed(() => void renderPrepared(roughWater), smoke ? 1 : 3) - timed(() => void renderPrepared(calmWater), smoke ? 1 : 3);
  // The sum over drops and the disc convolution share one stage; their split follows the operation counts.
  const spectralNsPerOp = (median(warm.spectral) * 1e6) / (nl * n * (radii + discSamples));
  return {
    mieTermAngle: (mieMs * 1e6) / termAngles,
    airySample: (airyMs * 1e6) / (bowRadii.length * samples),
    raySample: (rayMs * 1e6) / (bowRadii.length * samples),
    ...shaped,
    sumSample: spectralNsPerOp,
    discSample: spectralNsPerOp,
    colourSample: (median(warm.colour) * 1e6) / (nl * angles),
    jsonAngle: (jsonMs * 1e6) / angles,
    pngAngle: (pngMs * 1e6) / angles,
    overlayPixel: (pixelMs * 1e6) / pixels,
    roughGroupPixel: Math.max(0, (roughMs * 1e6) / (pixels * groups)),
  };
}

/**
 * What a listener costs a whole request when the work is least: the warm request (every kernel row in memory)
 * rendered as a job renders it (renderProfile, JSON), with the job's listener (throttled-progress.ts, publishing
 * nowhere) and without any, in pairs whose order alternates (without–with, with–without) so that drift cancels.
 * Overhead per pair = (with − without) ÷ without.
 */
async function warmOverhead(): Promise<{ withoutMs: number[]; withMs: number[]; overhead: number[]; rows: number }> {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: createInlinePool().compute });
  const request = profileRequestSchema.parse(WARM);
  const query = stripQuerySchema.parse({});
  const first = await computeProfile(request, { kernels, limits: { maxTermAngles: Infinity } });
  const once = async (listen: boolean) => {
    const throttle = listen ? throttledProgress(() => undefined) : undefined;
    const t0 = performance.now();
    await renderProfile(request, "json", query, { kernels, maxTermAngles: Infinity, onProgress: throttle?.listener });
    const ms = performance.now() - t0;
    throttle?.stop();
    return ms;
  };
  // Both paths run a few times first, so that neither is measured before the engine has optimised it.
  for (let r = 0; r < 8; r++) await once(r % 2 === 1);
  const withoutMs: number[] = [];
  const withMs: number[] = [];
  for (let pair = 0; pair < WARM_PAIRS; pair++) {
    for (const listen of pair % 2 === 0 ? [false, true] : [true, false]) (listen ? withMs : withoutMs).push(await once(listen));
  }
  return { withoutMs, withMs, overhead: withMs.map((w, k) => w / withoutMs[k] - 1), rows: (first.meta.kernel as { rows: number }).rows };
}

/**
 * The listener's own cost without the machine's noise: the warm request with the job's listener, run under V8's
 * sampling profiler (node:inspector), and the share of the CPU samples taken with the progress code on the stack —
 * the files of pipeline/progress/ (weights, plans, meter, throttled listener) and what they call; V8 attributes
 * inlined functions to their own source, so counting inlined into the kernel service is in the share.
 */
async function countingCpuShare(runs: number): Promise<{ share: number; progressMs: number; totalMs: number }> {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: createInlinePool().compute });
  const request = profileRequestSchema.parse(WARM);
  const query = stripQuerySchema.parse({});
  const render = async () => {
    const throttle = throttledProgress(() => undefined);
    await renderProfile(request, "json", query, { kernels, maxTermAngles: Infinity, onProgress: throttle.listener });
    throttle.stop();
  };
  for (let r = 0; r < 5; r++) await render();
  const session = new Session();
  session.connect();
  await session.post("Profiler.enable");
  await session.post("Profiler.setSamplingInterval", { interval: 100 });
  await session.post("Profiler.start");
  for (let r = 0; r < runs; r++) await render();
  const { profile } = await session.post("Profiler.stop");
  session.disconnect();
  // A sample counts when the progress code is anywhere on its stack (what it calls, as mieTermCount, is its cost too).
  const parent = new Map<number, number>();
  for (const n of profile.nodes) for (const c of n.children ?? []) parent.set(c, n.id);
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const inProgress = new Set<number>();
  for (const n of profile.nodes) {
    for (let id: number | undefined = n.id; id !== undefined; id = parent.get(id)) {
      if (byId.get(id)!.callFrame.url.includes("/pipeline/progress/")) {
        inProgress.add(n.id);
        break;
      }
    }
  }
  let progressUs = 0;
  let totalUs = 0;
  profile.samples!.forEach((id, k) => {
    const us = profile.timeDeltas![k];
    totalUs += us;
    if (inProgress.has(id)) progressUs += us;
  });
  return { share: progressUs / totalUs, progressMs: progressUs / 1000, totalMs: totalUs / 1000 };
}

interface ShowerRun {
  ms: number;
  updates: ProgressUpdate[];
  /** Largest difference between the fraction reported and the share of the run's time gone by then (0: perfectly even). */
  unevenness: number;
  /** Estimate of seconds left when the fraction first reached 50 %, and the seconds that were actually left. */
  atHalf: { estimateS: number | null; actualS: number } | null;
}

async function coldShower(pool: ReturnType<typeof createWorkerPool>, listen: boolean): Promise<ShowerRun> {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute, parallelism: pool.threads });
  const updates: ProgressUpdate[] = [];
  const times: number[] = [];
  let half: { at: number; estimateS: number | null } | null = null;
  const t0 = performance.now();
  const progress = listen
    ? new ProgressMeter(PROFILE_STAGES, (u) => {
        updates.push(u);
        times.push(performance.now());
        if (!half && u.fraction >= 0.5) half = { at: performance.now(), estimateS: u.secondsLeft };
      })
    : undefined;
  await computeProfile(profileRequestSchema.parse(SHOWER), { kernels, limits: { maxTermAngles: Infinity }, progress });
  const end = performance.now();
  const h = half as { at: number; estimateS: number | null } | null;
  const unevenness = Math.max(0, ...updates.map((u, k) => Math.abs(u.fraction - (times[k] - t0) / (end - t0))));
  return { ms: end - t0, updates, unevenness, atHalf: h ? { estimateS: h.estimateS, actualS: (end - h.at) / 1000 } : null };
}

const fixed = (digits: number) => (v: number) => v.toFixed(digits);
const msList = (values: number[]) => values.map(fixed(1)).join(", ");

const counting = await warmOverhead();
const warmSpread = spread(counting.overhead);
console.log(
  `warm ${counting.rows} rows: without a listener median ${median(counting.withoutMs).toFixed(1)} ms, with ${median(counting.withMs).toFixed(1)} ms; ` +
    `overhead per pair ${percentSpread(warmSpread)}`,
);
const cpu = await countingCpuShare(WARM_PAIRS / 2);
console.log(`warm with a listener under the profiler: ${(100 * cpu.share).toFixed(3)} % of ${cpu.totalMs.toFixed(0)} ms of samples with pipeline/progress/ on the stack`);
if (countingOnly) process.exit(0);

const costs = await workCosts();
const drift = weightDrift(costs);
for (const d of drift) {
  const flags = [d.stale ? `stale: ${d.ratio.toFixed(2)}× its weight` : "", d.uneven ? `out of proportion: ${d.relative.toFixed(2)}× against the others` : ""].filter(Boolean);
  console.log(`${d.piece}: ${d.measuredNs.toPrecision(3)} ns (in use: ${d.inUseNs})${flags.length ? `  <-- ${flags.join("; ")}` : ""}`);
}

const pool = createWorkerPool(2);
await computeProfile(profileRequestSchema.parse({ water: { temperatureC: 16 } }), {
  kernels: new KernelService({ memoryBudgetBytes: 2 ** 30, compute: pool.compute }),
  limits: { maxTermAngles: Infinity },
});
const without: number[] = [];
const withListener: ShowerRun[] = [];
for (let round = 0; round < COLD_ROUNDS; round++) {
  // The order alternates from round to round, so that a trend in the machine's speed falls on both alike.
  for (const listen of round % 2 === 0 ? [false, true] : [true, false]) {
    const run = await coldShower(pool, listen);
    if (listen) withListener.push(run);
    else without.push(run.ms);
  }
  console.log(`round ${round + 1}: without ${without.at(-1)!.toFixed(0)} ms, with ${withListener.at(-1)!.ms.toFixed(0)} ms`);
}
await pool.close();
const coldSpread = spread(withListener.map((r, k) => r.ms / without[k] - 1));
const distinct = withListener.map((r) => new Set(r.updates.map((u) => u.fraction.toFixed(3))).size);
console.log(`${SHOWER_NAME} cold, 2 workers: without ${median(without).toFixed(0)} ms, with ${median(withListener.map((r) => r.ms)).toFixed(0)} ms; per round ${percentSpread(coldSpread)}`);
for (const r of withListener) console.log(`at 50 %: estimated ${r.atHalf?.estimateS?.toFixed(2)} s left, actually ${r.atHalf?.actualS.toFixed(2)} s`);
if (smoke) process.exit(0);

const flagged = drift.filter((d) => d.stale || d.uneven);
writeMarkedSection("progress", [
  "## Progress: weights and cost",
  "",
  `Written by \`npm run bench:progress\` (bench/progress.ts), ${benchDate()}; ${machineLine()}.`,
  "",
  "Costs progress is weighted by (pipeline/progress/work-costs.ts holds them, rounded), one core, medians: Mie on a",
  "550 nm task of 200, 500 and 1000 µm drops over ψ 29.7–60.3° (0.05°); Airy and ray rows on 40 drops from 100 µm;",
  "a flattened drop's plane (2 mm, equilibrium shape, no canting) at 0.05° and 0.01°, its fixed cost and cost per bin",
  "from the two; spectral sum and colour on a warm profile of P3's drops (method auto), the stage times as its progress",
  "reports them; encoding of its answer and of the default camera view.",
  `A weight is flagged when the measurement is more than ${WEIGHT_DRIFT_LIMIT}× from it either way (stale), or when its ratio`,
  "is more than 2× from the median ratio of all pieces (out of proportion: that is what makes the fraction's pace uneven).",
  "",
  "| piece | measured ns | in use | measured ÷ in use | flag |",
  "|---|---|---|---|---|",
  ...drift.map(
    (d) =>
      `| ${d.piece} | ${d.measuredNs.toPrecision(3)} | ${d.inUseNs} | ${d.ratio.toFixed(2)} | ${[d.stale ? "stale" : "", d.uneven ? `out of proportion (${d.relative.toFixed(2)}×)` : ""].filter(Boolean).join(", ") || "–"} |`,
  ),
  "",
  flagged.length ? `Flagged: ${flagged.map((d) => d.piece).join(", ")}: set work-costs.ts from this run.` : "No weight flagged.",
  "",
  `What a progress listener costs a whole request: ${WARM_PAIRS} pairs of the warm request (P3's drops under auto, every one of`,
  `its ${counting.rows} kernel rows in memory, rendered as JSON as a job renders it, with the job's throttled listener and without`,
  "any), the order alternating from pair to pair:",
  "",
  `- without a listener: median ${median(counting.withoutMs).toFixed(1)} ms (quartiles ${spread(counting.withoutMs).q1.toFixed(1)}–${spread(counting.withoutMs).q3.toFixed(1)} ms)`,
  `- with a listener: median ${median(counting.withMs).toFixed(1)} ms (quartiles ${spread(counting.withMs).q1.toFixed(1)}–${spread(counting.withMs).q3.toFixed(1)} ms)`,
  `- overhead (with − without) ÷ without, per pair: ${percentSpread(warmSpread)}`,
  `- the same request with the listener, ${WARM_PAIRS / 2} times under V8's sampling profiler (0.1 ms): ${(100 * cpu.share).toFixed(3)} % of the CPU samples`,
  `  (${cpu.progressMs.toFixed(1)} of ${cpu.totalMs.toFixed(0)} ms) were taken with the progress code (pipeline/progress/) on the stack, free of the run-to-run noise`,
  "",
  `${SHOWER_NAME}, cold on 2 worker threads, ${COLD_ROUNDS} round${COLD_ROUNDS === 1 ? "" : "s"}, each without and with a listener that keeps every`,
  "update (pipeline/progress/progress-meter.ts), the order alternating from round to round:",
  "",
  "| round | without listener (ms) | with listener (ms) | updates | distinct fractions | largest gap between fraction and time share | time left estimated at 50 % (s) | actually left (s) |",
  "|---|---|---|---|---|---|---|---|",
  ...withListener.map(
    (r, k) =>
      `| ${k + 1} | ${without[k].toFixed(0)} | ${r.ms.toFixed(0)} | ${r.updates.length} | ${distinct[k]} | ${r.unevenness.toFixed(3)} | ${r.atHalf?.estimateS?.toFixed(2) ?? "–"} | ${r.atHalf?.actualS.toFixed(2) ?? "–"} |`,
  ),
  "",
  `With a listener against without, per round: ${percentSpread(coldSpread)}; medians ${median(without).toFixed(0)} ms and`,
  `${median(withListener.map((r) => r.ms)).toFixed(0)} ms. Rounds in ms, without: ${msList(without)}; with: ${msList(withListener.map((r) => r.ms))}.`,
]);
