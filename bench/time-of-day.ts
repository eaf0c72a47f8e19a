// npm run bench:textures: a 256 × 32 texture with 16 sun-elevation slices, cold (empty kernel cache, threads warmed by
// another request) and warm (kernels cached), in one process on this machine; writes its section of BENCHMARKS.md.
import { performance } from "node:perf_hooks";
import { cpus, loadavg } from "node:os";
import { lutRequestSchema } from "../schemas/lut.js";
import { computeSlicedLut } from "../pipeline/compute/lut-time-of-day.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { encodeKtx2 } from "../pipeline/encoders/ktx2.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";

const WORKERS = 2;
const TEXTURE = {
  angles: { fromDeg: 30, toDeg: 60, texels: 256, mapping: "bow-weighted" },
  sizes: { kind: "radius", fromUm: 10, toUm: 2000, texels: 32 },
  sunElevations: { fromDeg: 0, toDeg: 45, slices: 16 },
};
/** Another texture (other water temperature, so other kernels): starts the threads and the JIT before the cold run. */
const WARM_UP = { ...TEXTURE, sunElevations: { fromDeg: 0, toDeg: 45, slices: 2 }, scenario: { water: { temperatureC: 16 } } };

const machine = machineLine();
const date = benchDate();
const loadBefore = loadavg()[0];

const pool = createWorkerPool(WORKERS);
const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute });
const deps = { kernels, limits: { maxTermAngles: Infinity } };
await computeSlicedLut(lutRequestSchema.parse(WARM_UP), { ...deps, kernels: new KernelService({ memoryBudgetBytes: 2 ** 30, compute: pool.compute }) });

const request = lutRequestSchema.parse(TEXTURE);
let t0 = performance.now();
const cold = await computeSlicedLut(request, deps);
const coldMs = performance.now() - t0;
const warm: number[] = [];
for (let i = 0; i < 3; i++) {
  t0 = performance.now();
  await computeSlicedLut(request, deps);
  warm.push(performance.now() - t0);
}
warm.sort((a, b) => a - b);
t0 = performance.now();
const file = encodeKtx2({ width: cold.width, height: cold.height, layers: cold.slices, rgba: cold.rgba, pixelType: "half", space: "acescg", premultipliedAlpha: true, keyValues: {} });
const encodeMs = performance.now() - t0;
await pool.close();
const loadAfter = loadavg()[0];

console.log(`time-of-day texture 256 × 32 × 16: cold ${coldMs.toFixed(0)} ms, warm ${warm[1].toFixed(0)} ms, KTX2 encode ${encodeMs.toFixed(1)} ms (${file.byteLength} bytes); load ${loadBefore.toFixed(2)} → ${loadAfter.toFixed(2)}`);
writeMarkedSection("textures", [
  "## Time-of-day lookup textures",
  "",
  `Written by \`npm run bench:textures\` (bench/time-of-day.ts), ${date}; ${machine}; ${WORKERS} worker threads; one-minute load average`,
  `${loadBefore.toFixed(2)} at the start, ${loadAfter.toFixed(2)} at the end` +
    (Math.max(loadBefore, loadAfter) > cpus().length ? " (above the core count: other processes shared the cores, so times are inflated)." : "."),
  "Texture: ψ 30–60° in 256 bow-weighted texels × 32 radii 10 µm–2 mm × 16 sun elevations 0–45°. Cold: empty kernel cache,",
  "threads warmed by another texture. Warm: the same texture again on the filled kernel cache (median of 3). The rows ask for",
  "their kernels in one request (one task per wavelength carries all 32 drops), each row's spectral sum with the sun's disc is",
  "computed once per unit sunlight, and each slice only re-weights it by its own sunlight and takes the colour sums",
  "(pipeline/compute/lut.ts, computeLutsAcrossSun). Cold/warm is the share of the time spent on kernels.",
  "",
  "| texture | cold (ms) | warm (ms) | cold / warm | KTX2 RGBA16F encode (ms) | KTX2 bytes |",
  "| --- | ---: | ---: | ---: | ---: | ---: |",
  `| 256 × 32 × 16 slices | ${coldMs.toFixed(0)} | ${warm[1].toFixed(0)} | ${(coldMs / warm[1]).toFixed(1)} | ${encodeMs.toFixed(1)} | ${file.byteLength} |`,
]);
