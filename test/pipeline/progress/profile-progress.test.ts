// A profile's progress is counted in its kernel rows and later stages: it rises in many steps, never falls, and
// rows already cached count at once.
import { describe, it, expect } from "vitest";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { computeProfile, PROFILE_STAGES } from "../../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { ProgressMeter, type ProgressUpdate } from "../../../pipeline/progress/progress-meter.js";
import { renderOverlay } from "../../../pipeline/render/view-render.js";
import { renderProfile } from "../../../pipeline/render/profile-render.js";
import { imageQuerySchema, viewRequestSchema } from "../../../schemas/view.js";
import { stripQuerySchema } from "../../../schemas/formats.js";

// 16 wavelengths: one kernel task each (a task is one wavelength's rows).
const body = profileRequestSchema.parse({
  drops: { kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.2, totalNumberPerM3: 1e6 },
  angles: { fromDeg: 36, toDeg: 44, stepDeg: 0.2 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
  mieSizesPerDecade: 64,
  method: "mie",
});

async function run(kernels: KernelService) {
  const updates: ProgressUpdate[] = [];
  const progress = new ProgressMeter(PROFILE_STAGES, (u) => updates.push(u));
  await computeProfile(body, { kernels, limits: { maxTermAngles: Infinity }, progress });
  progress.done();
  return updates;
}

describe("profile progress", () => {
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute: createInlinePool().compute });

  it("rises through the kernel rows, the spectral sum and colour, and never falls", async () => {
    const updates = await run(kernels);
    const fractions = updates.map((u) => u.fraction);
    for (let k = 1; k < fractions.length; k++) expect(fractions[k]).toBeGreaterThanOrEqual(fractions[k - 1]);
    const kernelFractions = new Set(updates.filter((u) => u.stage === "kernels").map((u) => u.fraction));
    // One step per task (wavelength) at least: 16 tasks, plus the empty lookup.
    expect(kernelFractions.size).toBeGreaterThanOrEqual(16);
    expect(updates.map((u) => u.stage)).toEqual(expect.arrayContaining(["kernels", "spectral", "colour", "done"]));
    expect(fractions.at(-1)).toBe(1);
    // Kernels are nearly all of a cold full-Mie profile's cost.
    const lastKernel = updates.filter((u) => u.stage === "kernels").at(-1)!.fraction;
    expect(lastKernel).toBeGreaterThan(0.5);
  });

  it("counts rows found in the cache at once, so a repeat starts where the first run's kernels ended", async () => {
    const updates = await run(kernels);
    const first = updates[0];
    expect(first.stage).toBe("kernels");
    expect(first.fraction).toBeGreaterThan(0.5);
    // Found rows are not work done here: no estimate of time left from them.
    expect(first.secondsLeft).toBeNull();
  });

  it("a camera view counts its pixels after the profile, and a synchronous render (no listener) counts nothing", async () => {
    const updates: ProgressUpdate[] = [];
    const view = viewRequestSchema.parse({
      scenario: { drops: { kind: "monodisperse", radiusUm: 300 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 } },
      camera: { widthPx: 64, heightPx: 36 },
    });
    await renderOverlay("view", view, imageQuerySchema.parse({ format: "png" }), { kernels, maxTermAngles: Infinity, onProgress: (u) => updates.push(u) });
    const stages = updates.map((u) => u.stage);
    expect(stages.indexOf("pixels")).toBeGreaterThan(stages.lastIndexOf("kernels"));
    expect(updates.at(-1)!.fraction).toBe(1);
    for (let k = 1; k < updates.length; k++) expect(updates[k].fraction).toBeGreaterThanOrEqual(updates[k - 1].fraction);
    // Without a listener the kernel service is asked for no report at all.
    let watched = false;
    const spy = new KernelService({ memoryBudgetBytes: 2 ** 26, compute: createInlinePool().compute });
    const rows = spy.rows.bind(spy);
    spy.rows = (request, signal, watch) => {
      watched ||= Boolean(watch?.onRows);
      return rows(request, signal, watch);
    };
    await renderProfile(body, "json", stripQuerySchema.parse({}), { kernels: spy, maxTermAngles: Infinity });
    expect(watched).toBe(false);
  });
});
