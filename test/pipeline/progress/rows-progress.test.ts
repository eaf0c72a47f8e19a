// Answers made of several profiles and flattened drops weigh their progress by the work, not by counting equal
// steps (issue 17): a lookup texture's shared kernels task by task, against the kernel engines' own count of the
// work each task did; a flattened-drop profile by its scattering planes. No timing: the weights are checked
// against what the engines report, and the fractions for order and number.
import { describe, it, expect } from "vitest";
import { KernelService, type KernelStats } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { lutRequestSchema, lutQuerySchema } from "../../../schemas/lut.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { stripQuerySchema } from "../../../schemas/formats.js";
import { renderLut } from "../../../pipeline/render/lut-render.js";
import { renderProfile } from "../../../pipeline/render/profile-render.js";
import type { ProgressUpdate } from "../../../pipeline/progress/progress-meter.js";
import { COST_NS } from "../../../pipeline/progress/work-costs.js";

/** A kernel service that keeps the engines' statistics of every rows() call (one call per profile, in order). */
function watchedKernels(): { kernels: KernelService; calls: KernelStats[] } {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute: createInlinePool().compute });
  const calls: KernelStats[] = [];
  const rows = kernels.rows.bind(kernels);
  kernels.rows = async (request, signal, watch) => {
    const result = await rows(request, signal, watch);
    calls.push(result.stats);
    return result;
  };
  return { kernels, calls };
}

function expectRising(updates: ProgressUpdate[]): void {
  for (let k = 1; k < updates.length; k++) expect(updates[k].fraction).toBeGreaterThanOrEqual(updates[k - 1].fraction);
  expect(updates.at(-1)).toEqual({ fraction: 1, stage: "done", secondsLeft: 0 });
}

describe("progress weighed by the work", () => {
  it("a lookup texture's kernels move the fraction by each task's Lorenz–Mie work, not by equal steps", async () => {
    // The texture's rows ask for their kernels together (one task per wavelength carries every row's drop), so the
    // work is weighed task by task: against the engines' own count of the term-angles each task computed.
    const perTask: number[] = [];
    const compute = createInlinePool().compute;
    const kernels = new KernelService({
      memoryBudgetBytes: 2 ** 28,
      compute: async (task, signal) => {
        const result = await compute(task, signal);
        perTask.push(result.mieTermAngles);
        return result;
      },
    });
    const updates: ProgressUpdate[] = [];
    // Five drop sizes from 100 µm to 1 mm, full Mie, over 420–580 nm: a task's work grows with the size parameter
    // x = 2πr/λ (Wiscombe 1980's term count), so the 420 nm task costs about 1.4 times the 580 nm one.
    const request = lutRequestSchema.parse({
      angles: { fromDeg: 38, toDeg: 44, texels: 32, mapping: "linear" },
      sizes: { kind: "radius", fromUm: 100, toUm: 1000, texels: 5 },
      scenario: { method: "mie", spectral: { fromNm: 420, toNm: 580, stepNm: 20 } },
    });
    await renderLut(request, lutQuerySchema.parse({ format: "exr" }), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    expectRising(updates);
    expect([...new Set(updates.map((u) => u.stage))]).toEqual(["kernels", "spectral", "colour", "done"]);
    // The empty look-up, then one step per task (tasks end in the order they were given: the inline pool).
    const kernelSteps = updates.filter((u) => u.stage === "kernels").map((u) => u.fraction);
    expect(kernelSteps.length).toBe(1 + perTask.length);
    const steps = kernelSteps.slice(1).map((f, k) => f - kernelSteps[k]);
    const totalSteps = steps.reduce((a, b) => a + b, 0);
    const totalWork = perTask.reduce((a, b) => a + b, 0);
    // Each task's share of the kernels' fraction is its share of the engines' count (5 %: the estimate counts
    // Wiscombe's terms per size, the engine the terms it really summed).
    steps.forEach((step, k) => expect(Math.abs(step / totalSteps - perTask[k] / totalWork)).toBeLessThan(0.05 * (perTask[k] / totalWork)));
    expect(steps[0]).toBeGreaterThan(1.25 * steps.at(-1)!);
    // The kernels are nearly all the work: the sum over drops, the disc and the colour of 32 texels are a few per cent.
    expect(kernelSteps.at(-1)!).toBeGreaterThan(0.9);
  });

  it("rows that share radius nodes (rain rates) have each node's kernels computed and weighed once", async () => {
    const computedRadii: number[][] = [];
    const compute = createInlinePool().compute;
    const kernels = new KernelService({
      memoryBudgetBytes: 2 ** 28,
      compute: async (task, signal) => {
        computedRadii.push(task.items.map((item) => item.radiusUm));
        return compute(task, signal);
      },
    });
    const updates: ProgressUpdate[] = [];
    const request = lutRequestSchema.parse({
      angles: { fromDeg: 38, toDeg: 44, texels: 32, mapping: "linear" },
      sizes: { kind: "rain-rate", fromMmPerH: 1, toMmPerH: 25, texels: 3 },
      scenario: { method: "airy", spectral: { fromNm: 500, toNm: 580, stepNm: 20 } },
    });
    await renderLut(request, lutQuerySchema.parse({ format: "exr" }), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    expectRising(updates);
    // One task per wavelength, each radius node in it once, though the three rain rates' drops overlap.
    expect(computedRadii).toHaveLength(5);
    for (const radii of computedRadii) expect(new Set(radii).size).toBe(radii.length);
    // Airy rows of one span cost the same: the five tasks, alike, move the fraction by equal steps.
    const kernelSteps = updates.filter((u) => u.stage === "kernels").map((u) => u.fraction);
    const steps = kernelSteps.slice(1).map((f, k) => f - kernelSteps[k]);
    expect(steps).toHaveLength(5);
    for (const step of steps) expect(step).toBeCloseTo(steps[0], 9);
  });

  it("a flattened-drop profile job is weighed by its scattering planes: the kernels are nearly all of it, one even step per wavelength", async () => {
    const { kernels } = watchedKernels();
    const updates: ProgressUpdate[] = [];
    // One 2 mm drop, upright (one plane per wavelength), four wavelengths: four kernel tasks of equal work.
    const body = profileRequestSchema.parse({
      drops: { kind: "monodisperse", radiusUm: 2000, numberPerM3: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } },
      spectral: { fromNm: 500, toNm: 560, stepNm: 20 },
      angles: { fromDeg: 38, toDeg: 44, stepDeg: 0.05 },
      sun: { elevationDeg: 10 },
    });
    await renderProfile(body, "json", stripQuerySchema.parse({}), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    expectRising(updates);
    const kernelSteps = updates.filter((u) => u.stage === "kernels").map((u) => u.fraction);
    // The empty look-up, then one step per task.
    expect(kernelSteps.length).toBe(5);
    // Equal steps (the last one ends at 0.999, the most before done: left out).
    const steps = kernelSteps.slice(1, -1).map((f, k) => f - kernelSteps[k]);
    for (const s of steps) expect(s).toBeCloseTo(steps[0], 9);
    expect(steps[0]).toBeGreaterThan(0.24);
    // A plane costs tenths of a second, the sum over drops and the colour of 121 angles far less: were the flattened
    // rows priced as the sphere's Airy rows, the kernels would be a few per cent of the fraction.
    expect(kernelSteps.at(-1)!).toBeGreaterThan(0.95);
  });
});
