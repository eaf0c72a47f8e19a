// Answers made of several profiles and flattened drops weigh their progress by the work, not by counting equal
// steps (issue 17): a lookup texture's rows by their profiles' cost, against the kernel engines' own count of the
// work each row did; a flattened-drop profile by its scattering planes. No timing: the weights are checked
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

/** Each row's share of the fraction: what the fraction gained from the end of the row before to the end of this one. */
function rowShares(updates: ProgressUpdate[], rows: number): number[] {
  const ends = Array.from({ length: rows }, (_, j) => updates.filter((u) => u.stage === `row ${j + 1} of ${rows}`).at(-1)!.fraction);
  // The last row ends at 0.999, the most a render reports before it is done (progress-meter.ts).
  ends[rows - 1] = 1;
  return ends.map((f, j) => f - (j > 0 ? ends[j - 1] : 0));
}

describe("progress weighed by the work", () => {
  it("a lookup texture's rows move the fraction by their share of the Lorenz–Mie work, not equally", async () => {
    const { kernels, calls } = watchedKernels();
    const updates: ProgressUpdate[] = [];
    // Five drop sizes from 100 µm to 1 mm, full Mie: a row's work grows with the size parameter (Wiscombe 1980's
    // term count), so the largest row is about ten times the smallest.
    const request = lutRequestSchema.parse({
      angles: { fromDeg: 38, toDeg: 44, texels: 32, mapping: "linear" },
      sizes: { kind: "radius", fromUm: 100, toUm: 1000, texels: 5 },
      scenario: { method: "mie", spectral: { fromNm: 500, toNm: 580, stepNm: 20 } },
    });
    await renderLut(request, lutQuerySchema.parse({ format: "exr" }), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    expectRising(updates);
    const shares = rowShares(updates, 5);
    // The engines' own count: Lorenz–Mie term-angles each row computed (KernelStats.mieTermAngles).
    const work = calls.map((c) => c.mieTermAngles * COST_NS.mieTermAngle);
    const total = work.reduce((a, b) => a + b, 0);
    const engineShares = work.map((w) => w / total);
    // The spectral sum and colour, about the same for every row, are left out of the engines' count: they are a few
    // per cent of the whole, most of it on the smallest rows (0.03 absolute covers them).
    for (let j = 0; j < 5; j++) expect(Math.abs(shares[j] - engineShares[j])).toBeLessThan(0.03);
    expect(shares[4]).toBeGreaterThan(3 * shares[0]);
    // Every row reports as it goes (one step per wavelength at least), not only when it ends.
    expect(new Set(updates.map((u) => u.fraction.toFixed(4))).size).toBeGreaterThanOrEqual(5 * 5);
  });

  it("rows whose kernels an earlier row computed (rain rates share radius nodes) weigh only their new work", async () => {
    const { kernels, calls } = watchedKernels();
    const updates: ProgressUpdate[] = [];
    const request = lutRequestSchema.parse({
      angles: { fromDeg: 38, toDeg: 44, texels: 32, mapping: "linear" },
      sizes: { kind: "rain-rate", fromMmPerH: 1, toMmPerH: 25, texels: 3 },
      scenario: { method: "airy", spectral: { fromNm: 500, toNm: 580, stepNm: 20 } },
    });
    await renderLut(request, lutQuerySchema.parse({ format: "exr" }), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    expectRising(updates);
    const shares = rowShares(updates, 3);
    // The engines' count: Airy rows computed by each row's profile (all of one length, so of one cost).
    const computed = calls.map((c) => c.computed);
    expect(computed[1]).toBeLessThan(computed[0]);
    const engineShares = computed.map((c) => c / computed.reduce((a, b) => a + b, 0));
    for (let j = 0; j < 3; j++) expect(Math.abs(shares[j] - engineShares[j])).toBeLessThan(0.05);
    expect(shares[0]).toBeGreaterThan(shares[1]);
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
