// Kernel rows of flattened drops are cached like every kernel row, keyed on what they depend on: the shape, the
// canting, the sun's elevation and the arc position (each rounded as lib/bow/shaped-rows.ts says), on disk too.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { KernelService, type KernelCompute } from "../../../pipeline/kernels/kernel-service.js";
import { DiskStore } from "../../../pipeline/kernels/disk-store.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { computeProfile } from "../../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { kernelRows } from "../../../lib/bow/kernel-rows.js";
import { dropMedia } from "../../../lib/water/drop-medium.js";
import type { KernelTask } from "../../../pipeline/kernels/kernel-types.js";
import { SHAPED_ORDER_GROUPS } from "../../../lib/bow/shaped-rows.js";

const limits = { maxTermAngles: Infinity };
// One drop size, no canting, two wavelengths and a narrow window: a few seconds of ray tracing per profile.
const body = (arcPositionDeg: number, sunElevationDeg = 10) =>
  profileRequestSchema.parse({
    drops: { kind: "monodisperse", radiusUm: 600, shape: { kind: "equilibrium", cantingSdDeg: 0 } },
    arcPositionDeg,
    sun: { elevationDeg: sunElevationDeg },
    angles: { fromDeg: 40, toDeg: 42, stepDeg: 0.05 },
    spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
  });

let folder: string;
beforeAll(async () => {
  folder = await mkdtemp(join(tmpdir(), "antisolar-shaped-"));
});
afterAll(async () => rm(folder, { recursive: true, force: true }));

describe("kernel rows of flattened drops", () => {
  it("are computed once, found again in memory and on disk, and kept apart by arc position and sun elevation", async () => {
    let tasks = 0;
    const inline = createInlinePool().compute;
    const compute: KernelCompute = (task, signal) => {
      tasks++;
      return inline(task, signal);
    };
    const disk = new DiskStore(folder);
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute, disk });
    const first = await computeProfile(body(0), { kernels, limits });
    expect(first.meta.kernel.computed).toBeGreaterThan(0);
    const computedTasks = tasks;

    // The same request, and one whose arc position rounds to the same 0.125° step: memory hits only.
    for (const arc of [0, 0.05]) {
      const again = await computeProfile(body(arc), { kernels, limits });
      expect(again.meta.kernel.computed).toBe(0);
      expect(Array.from(again.spectral.perpendicular)).toEqual(Array.from(first.spectral.perpendicular));
    }
    expect(tasks).toBe(computedTasks);

    // Another place on the bow, or another sun: other rows.
    const side = await computeProfile(body(90), { kernels, limits });
    expect(side.meta.kernel.computed).toBeGreaterThan(0);
    const higherSun = await computeProfile(body(0, 20), { kernels, limits });
    expect(higherSun.meta.kernel.computed).toBeGreaterThan(0);

    // A new service on the same disk (as after a restart) reads the rows back.
    await kernels.flush();
    const restarted = new KernelService({ memoryBudgetBytes: 2 ** 28, compute, disk: new DiskStore(folder) });
    const fromDisk = await computeProfile(body(0), { kernels: restarted, limits });
    expect(fromDisk.meta.kernel.computed).toBe(0);
    expect(fromDisk.meta.kernel.diskHits).toBeGreaterThan(0);
    expect(Array.from(fromDisk.spectral.perpendicular)).toEqual(Array.from(first.spectral.perpendicular));
  }, 600_000);
});

describe("kernel tasks of flattened drops", () => {
  const { media } = dropMedia({ temperatureC: 10, salinityPsu: 0 }, Array.from({ length: 8 }, (_, l) => 400 + 40 * l));
  const shape = { kind: "equilibrium" as const, cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 45, rayOnly: false };
  const within = { first: 800, last: 840 };

  async function rowsAndTasks(radiiUm: Float64Array) {
    const seen: KernelTask[] = [];
    const inline = createInlinePool().compute;
    const kernels = new KernelService({
      memoryBudgetBytes: 2 ** 28,
      compute: (task, signal) => {
        seen.push(task);
        return inline(task, signal);
      },
      parallelism: 2,
    });
    const rows = await kernels.rows({ h: 0.05, media, radiiUm, engines: Array.from(radiiUm, () => "airy" as const), shapes: Array.from(radiiUm, () => shape), blocks: [8], within });
    return { rows, seen };
  }

  /** Worst |difference| over the peak between the service's rows and one task per wavelength and radius. */
  function worstAgainstAlone(rows: Awaited<ReturnType<typeof rowsAndTasks>>["rows"], radiiUm: Float64Array): number {
    let worst = 0;
    media.forEach((medium, l) => {
      radiiUm.forEach((radiusUm, i) => {
        const alone = kernelRows({ medium, h: 0.05, items: [{ radiusUm, engine: "airy", blocks: [8], shape }], within }).rows[0][0];
        const together = rows.get(l, i, 8);
        const peak = Math.max(...alone.filter((v) => !Number.isNaN(v)));
        alone.forEach((v, k) => {
          expect(Number.isNaN(together[k])).toBe(Number.isNaN(v));
          if (!Number.isNaN(v)) worst = Math.max(worst, Math.abs(together[k] - v) / peak);
        });
      });
    });
    return worst;
  }

  it("one shape without canting and two threads: one task per order group (one canting node), each of all eight wavelengths, rows bit for bit those of one task per wavelength", async () => {
    const radiiUm = Float64Array.from([600]);
    const { rows, seen } = await rowsAndTasks(radiiUm);
    // Split in parts (pipeline/kernels/canting-parts.ts): few shapes for two threads.
    expect(seen.length).toBe(SHAPED_ORDER_GROUPS.length);
    expect(new Set(seen.map((task) => task.items[0].shape!.orderGroup))).toEqual(new Set(SHAPED_ORDER_GROUPS.map((_, g) => g)));
    for (const task of seen) expect(new Set(task.items.map((item) => item.medium!.wavelengthNm)).size).toBe(8);
    // Every plane is interpolated from the same indices (tracedIndices: the water's), whatever else its task holds.
    expect(worstAgainstAlone(rows, radiiUm)).toBe(0);
  }, 600_000);

  it("two shapes: each in its own tasks (one per order group), each with all eight wavelengths, rows bit for bit those of one task per wavelength", async () => {
    const radiiUm = Float64Array.from([600, 900]);
    const { rows, seen } = await rowsAndTasks(radiiUm);
    expect(seen.length).toBe(2 * SHAPED_ORDER_GROUPS.length);
    for (const task of seen) {
      expect(new Set(task.items.map((item) => item.radiusUm)).size).toBe(1);
      expect(new Set(task.items.map((item) => item.medium!.wavelengthNm)).size).toBe(8);
    }
    expect(worstAgainstAlone(rows, radiiUm)).toBe(0);
  }, 600_000);
});
