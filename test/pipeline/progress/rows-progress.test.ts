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
import { renderSizeMap } from "../../../pipeline/render/figure-render.js";
import { sizeMapRequestSchema } from "../../../schemas/figures.js";
import { renderOverlay } from "../../../pipeline/render/view-render.js";
import { imageQuerySchema, viewRequestSchema } from "../../../schemas/view.js";
import type { ProgressUpdate } from "../../../pipeline/progress/progress-meter.js";
import { COST_NS } from "../../../pipeline/progress/work-costs.js";
import { kernelWorkNs } from "../../../pipeline/progress/profile-work.js";
import { computeProfile, planProfile, PROFILE_STAGES } from "../../../pipeline/compute/profile.js";
import { ProgressMeter } from "../../../pipeline/progress/progress-meter.js";

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

  it("a size map's rows, computed side by side, each fill their own share and never complete one another", async () => {
    const { kernels } = watchedKernels();
    const updates: ProgressUpdate[] = [];
    const body = sizeMapRequestSchema.parse({
      radiusFromUm: 100,
      radiusToUm: 1000,
      radiusSteps: 3,
      method: "mie",
      angles: { fromDeg: 38, toDeg: 44, stepDeg: 0.25 },
      spectral: { fromNm: 500, toNm: 580, stepNm: 20 },
    });
    await renderSizeMap(body, "svg", { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    for (let k = 1; k < updates.length; k++) expect(updates[k].fraction).toBeGreaterThanOrEqual(updates[k - 1].fraction);
    // Each row reports while it works (one step per wavelength task at least), and the 1 mm row, about ten times
    // the 100 µm row's Lorenz–Mie work (Wiscombe 1980's term count grows with the size parameter), moves the
    // fraction most: the largest single rise is the 1 mm row's.
    expect(new Set(updates.map((u) => u.fraction.toFixed(4))).size).toBeGreaterThanOrEqual(3 * 5);
    let largest = { rise: 0, stage: "" };
    for (let k = 1; k < updates.length; k++) {
      const rise = updates[k].fraction - updates[k - 1].fraction;
      if (rise > largest.rise) largest = { rise, stage: updates[k].stage };
    }
    expect(largest.stage).toBe("row 3 of 3");
    expect(updates.at(-1)!.fraction).toBe(0.999);
  });

  it("a flattened-drop profile job is weighed by its scattering planes: the kernels are nearly all of it, in one step for one shape", async () => {
    const { kernels } = watchedKernels();
    const updates: ProgressUpdate[] = [];
    // One 2 mm drop, upright (one plane per wavelength), four wavelengths: one shape, so one kernel task for all four
    // wavelengths (pipeline/kernels/kernel-service.ts: a flattened drop's task holds its shape at every wavelength).
    const body = profileRequestSchema.parse({
      drops: { kind: "monodisperse", radiusUm: 2000, numberPerM3: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } },
      spectral: { fromNm: 500, toNm: 560, stepNm: 20 },
      angles: { fromDeg: 38, toDeg: 44, stepDeg: 0.05 },
      sun: { elevationDeg: 10 },
    });
    await renderProfile(body, "json", stripQuerySchema.parse({}), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    expectRising(updates);
    const kernelSteps = updates.filter((u) => u.stage === "kernels").map((u) => u.fraction);
    // The empty look-up, then one step for the one task.
    expect(kernelSteps.length).toBe(2);
    // A plane costs tenths of a second, the sum over drops and the colour of 121 angles far less: were the flattened
    // rows priced as the sphere's Airy rows, the kernels would be a few per cent of the fraction.
    expect(kernelSteps.at(-1)!).toBeGreaterThan(0.95);
  });

  it("a view of flattened drops counts every profile it takes along the arc, not only the first", async () => {
    const { kernels, calls } = watchedKernels();
    const updates: ProgressUpdate[] = [];
    // The side of the bow (arc positions about 90°) in a narrow camera: a few arc nodes 5° apart, each one upright
    // 2 mm drop (one plane per traced index) at two wavelengths: one kernel task per node, holding both wavelengths (a
    // flattened drop's task holds its shape at every wavelength; on one thread it is not split in parts).
    const body = viewRequestSchema.parse({
      scenario: {
        drops: { kind: "monodisperse", radiusUm: 2000, numberPerM3: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } },
        spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
      },
      sun: { azimuthDeg: 240, elevationDeg: 10 },
      camera: { yawDeg: 98, pitchDeg: 10, widthPx: 24, heightPx: 16, horizontalFovDeg: 12 },
      ground: false,
    });
    await renderOverlay("view", body, imageQuerySchema.parse({ format: "png" }), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    expectRising(updates);
    const nodes = calls.length;
    expect(nodes).toBeGreaterThanOrEqual(2);
    // Every node's task, then its profile's later steps, raise the fraction: the profiles fill the view's kernel stage
    // one after another.
    const rising = new Set(updates.filter((u) => u.stage === "kernels").map((u) => u.fraction.toFixed(6)));
    expect(rising.size).toBeGreaterThanOrEqual(2 * nodes);
    // The pixels come after all the nodes' work, which is nearly all of it (planes cost tenths of a second).
    const beforePixels = updates.filter((u) => u.stage !== "pixels" && u.stage !== "done").at(-1)!.fraction;
    expect(beforePixels).toBeGreaterThan(0.9);
  });

  it("a row is weighed with the kernel cost its profile's kernel service then counts (averaged Mie, Airy, flattened rows)", async () => {
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute: createInlinePool().compute, parallelism: 2 });
    const bodies = [
      // Lorenz–Mie averaged over each node's cell, and Airy above auto's budget.
      { drops: { kind: "lognormal", medianRadiusUm: 20, geometricSd: 1.3, totalNumberPerM3: 1e6 }, mieSizesPerDecade: 64, method: "mie" },
      { drops: { kind: "lognormal", medianRadiusUm: 400, geometricSd: 1.2, totalNumberPerM3: 1e3 }, method: "airy" },
      { drops: { kind: "monodisperse", radiusUm: 2000, numberPerM3: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } } },
    ].map((b) => profileRequestSchema.parse({ ...b, spectral: { fromNm: 540, toNm: 560, stepNm: 20 }, angles: { fromDeg: 40, toDeg: 43, stepDeg: 0.1 } }));
    for (const body of bodies) {
      let counted = 0;
      const rows = kernels.rows.bind(kernels);
      kernels.rows = (request, signal, watch) => rows(request, signal, { ...watch, onRows: (done, total, found) => ((counted = total), watch?.onRows?.(done, total, found)) });
      await computeProfile(body, { kernels, limits: { maxTermAngles: Infinity }, progress: new ProgressMeter(PROFILE_STAGES, undefined) });
      expect(counted).toBeGreaterThan(0);
      expect(kernelWorkNs(planProfile(body), kernels.parallelism) / counted).toBeCloseTo(1, 9);
    }
  });
});
