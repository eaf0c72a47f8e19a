// A flattened drops' kernel task of one shape spread over threads in parts by canting node and order group: every
// plane's order traced once, the parts queued largest first, the rows the same to the last bit as one task's, the
// plane count the count the tasks report and the estimate's, and progress moving part by part.
import { describe, expect, it } from "vitest";
import { shapedParts } from "../../../pipeline/kernels/canting-parts.js";
import { placeCantingRule, planeCantingNodes } from "../../../lib/bow/plane-canting-nodes.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import type { KernelTask } from "../../../pipeline/kernels/kernel-types.js";
import { computeProfile, toDistribution } from "../../../pipeline/compute/profile.js";
import { planDropShapes, shapedPlaneCounts } from "../../../pipeline/compute/drop-shape-plan.js";
import { latticeRadiusQuadrature } from "../../../lib/drops/lattice-quadrature.js";
import { INDEX_NODES, isBowGroup, SHAPED_ORDER_GROUPS } from "../../../lib/bow/shaped-rows.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { blockRange } from "../../../lib/bow/kernel-grid.js";
import { dropMedia } from "../../../lib/water/drop-medium.js";
import { ROTATION_SLICES, rotationElevationsDeg } from "../../../lib/bow/canting-rotation.js";

describe("shaped parts", () => {
  const top = { cantingSdDeg: 7.5, sunElevationDeg: 10, arcPositionDeg: 0 };

  it("are the group without a bow once per canting node and each bow group once over every node, shares adding up to 1, largest first", () => {
    const parts = shapedParts({ ...top, arcPositionDeg: 45 });
    const bowGroups = SHAPED_ORDER_GROUPS.filter((_, g) => isBowGroup(g)).length;
    expect(bowGroups).toBe(2);
    expect(parts.length).toBe(5 + bowGroups);
    expect(new Set(parts.map((p) => `${p.node}:${p.group}`)).size).toBe(parts.length);
    for (const p of parts) expect(p.node === undefined).toBe(isBowGroup(p.group));
    expect(parts.reduce((s, p) => s + p.share, 0)).toBeCloseTo(1, 12);
    for (let k = 1; k < parts.length; k++) expect(parts[k].share).toBeLessThanOrEqual(parts[k - 1].share);
    // At the top the two nodes tilted out of the scattering plane are mirror images: one node; of the banded rule
    // (large drops), the nodes across the plane in pairs: half of them traced (lib/bow/plane-canting-nodes.ts).
    expect(shapedParts(top).length).toBe(4 + bowGroups);
    const banded = { ...top, cantingBand: true };
    expect(shapedParts(banded).length).toBe(planeCantingNodes(banded).length + bowGroups);
    expect(planeCantingNodes(banded).length).toBe(placeCantingRule(banded).nodes.length / 2);
    // Upright drops: one node, its three groups.
    expect(shapedParts({ ...top, cantingSdDeg: 0 }).map((p) => p.node)).toEqual([undefined, undefined, 0]);
  });

  it("of the canting mean by rotation are its slices of sun elevations, shares by their elevations, adding up to 1", () => {
    const parts = shapedParts({ ...top, cantingRotation: true });
    expect(parts.map((p) => p.node)).toEqual(Array.from({ length: ROTATION_SLICES }, (_, k) => k));
    const sizes = parts.map((p) => rotationElevationsDeg(top.cantingSdDeg, p.node).length);
    expect(sizes.reduce((a, b) => a + b, 0)).toBe(rotationElevationsDeg(top.cantingSdDeg).length);
    parts.forEach((p, k) => expect(p.share).toBeCloseTo(sizes[k] / rotationElevationsDeg(top.cantingSdDeg).length, 12));
  });

  it("put first the bow groups (the costly ones), then each node's reflection, every node alike", () => {
    // No node is traced with its axis in the scattering plane (lib/bow/off-mirror-axis.ts): every node's reflection
    // costs the same, at the top of the bow as at its side with the sun on the horizon.
    for (const place of [top, { ...top, cantingBand: true }, { ...top, sunElevationDeg: 0, arcPositionDeg: 90 }]) {
      const parts = shapedParts(place);
      expect(new Set(parts.slice(0, 2).map((p) => p.group))).toEqual(new Set([1, 2]));
      const reflection = parts.slice(2);
      expect(reflection.every((p) => p.group === 0)).toBe(true);
      expect(new Set(reflection.map((p) => p.share.toFixed(12))).size).toBe(1);
      expect(reflection.map((p) => p.node)).toEqual(reflection.map((_, k) => k));
    }
  });
});

describe("one shape on two threads", () => {
  // One canted drop size (five canting nodes), two wavelengths, a narrow window: seconds of ray tracing.
  const request = profileRequestSchema.parse({
    drops: { kind: "monodisperse", radiusUm: 600, shape: { kind: "equilibrium" } },
    arcPositionDeg: 45,
    sun: { elevationDeg: 10 },
    angles: { fromDeg: 40, toDeg: 42, stepDeg: 0.05 },
    spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
  });

  async function run(parallelism: number) {
    const seen: KernelTask[] = [];
    const planes = { traced: 0, interpolated: 0 };
    const progress: { done: number; total: number }[] = [];
    const inline = createInlinePool().compute;
    const kernels = new KernelService({
      memoryBudgetBytes: 2 ** 28,
      parallelism,
      compute: async (task, signal) => {
        seen.push(task);
        const result = await inline(task, signal);
        planes.traced += result.shapedPlanes?.traced ?? 0;
        planes.interpolated += result.shapedPlanes?.interpolated ?? 0;
        return result;
      },
    });
    const rows = kernels.rows.bind(kernels);
    kernels.rows = (r, signal, watch) => rows(r, signal, { ...watch, onRows: (done, total, found) => (progress.push({ done, total }), watch?.onRows?.(done, total, found)) });
    const result = await computeProfile(request, { kernels, limits: { maxTermAngles: Infinity } });
    return { result, seen, planes, progress };
  }

  it("is split in its parts (the group without a bow per canting node, each bow group whole; every wavelength in each), queued largest first, traces each plane once as the estimate counts, and gives one task's rows bit for bit", async () => {
    const two = await run(2);
    const parts = shapedParts(planDropShapes(request, new Float64Array([600])).shapes[0]!);
    expect(two.seen.length).toBe(parts.length);
    // Queued in shapedParts' order: each part one node (or all) and one group, for both wavelengths.
    expect(two.seen.map((task) => [...new Set(task.items.map((item) => `${item.cantingNode}:${item.shape!.orderGroup}`))])).toEqual(parts.map((p) => [`${p.node}:${p.group}`]));
    for (const task of two.seen) expect(new Set(task.items.map((item) => item.medium?.wavelengthNm ?? task.medium.wavelengthNm)).size).toBe(2);

    const plan = planDropShapes(request, latticeRadiusQuadrature(toDistribution(request.drops)).radiiUm);
    const estimate = shapedPlaneCounts(plan, 2);
    // One shape, five canting nodes: 5 × INDEX_NODES traced planes, 5 × 2 interpolated.
    expect(estimate).toEqual({ traced: 5 * INDEX_NODES, interpolated: 10 });
    expect(two.planes).toEqual(estimate);

    // Progress: the empty look-up, then one step per part, rising to the total.
    const steps = two.progress.filter((p) => p.total > 0);
    expect(steps.length).toBe(1 + parts.length);
    for (let k = 1; k < steps.length; k++) expect(steps[k].done).toBeGreaterThan(steps[k - 1].done);
    expect(steps.at(-1)!.done / steps.at(-1)!.total).toBeCloseTo(1, 9);

    const one = await run(1);
    expect(one.seen.length).toBe(1);
    expect(one.planes).toEqual(estimate);
    expect(Array.from(two.result.spectral.perpendicular)).toEqual(Array.from(one.result.spectral.perpendicular));
    expect(Array.from(two.result.spectral.parallel)).toEqual(Array.from(one.result.spectral.parallel));
  }, 600_000);
});

describe("one shape by rotation on two threads", () => {
  // One canted 1.5 mm drop (the canting mean by rotation), two wavelengths, a narrow window: its slices on two threads
  // give one task's rows to the last bit.
  const request = profileRequestSchema.parse({
    drops: { kind: "monodisperse", radiusUm: 1500, shape: { kind: "equilibrium" } },
    arcPositionDeg: 20,
    angles: { fromDeg: 40, toDeg: 42, stepDeg: 0.05 },
    spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
  });
  async function run(parallelism: number) {
    const seen: KernelTask[] = [];
    const inline = createInlinePool().compute;
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, parallelism, compute: async (task, signal) => (seen.push(task), inline(task, signal)) });
    return { result: await computeProfile(request, { kernels, limits: { maxTermAngles: Infinity } }), seen };
  }
  it("is split in its slices and adds them up as one task does", async () => {
    expect(planDropShapes(request, new Float64Array([1500])).shapes[0]!.cantingRotation).toBe(true);
    const two = await run(2);
    expect(two.seen.map((task) => task.items[0].cantingNode)).toEqual(Array.from({ length: ROTATION_SLICES }, (_, k) => k));
    const one = await run(1);
    expect(one.seen.length).toBe(1);
    expect(Array.from(two.result.spectral.perpendicular)).toEqual(Array.from(one.result.spectral.perpendicular));
    expect(Array.from(two.result.spectral.parallel)).toEqual(Array.from(one.result.spectral.parallel));
    expect(Math.max(...one.result.spectral.perpendicular)).toBeGreaterThan(0);
  }, 600_000);
});

describe("which tasks are split", () => {
  // Tasks are only counted: each returns zero rows of the right length, nothing is traced.
  async function tasksFor(shapeCount: number, parallelism: number): Promise<KernelTask[]> {
    const seen: KernelTask[] = [];
    const kernels = new KernelService({
      memoryBudgetBytes: 2 ** 28,
      parallelism,
      compute: async (task) => {
        seen.push(task);
        return { rows: task.items.map((item) => item.blocks.map((b) => new Float64Array(2 * blockRange(b, 0.05).count))), mieTermAngles: 0 };
      },
    });
    const { media } = dropMedia({ temperatureC: 10, salinityPsu: 0 }, [550]);
    const radiiUm = Float64Array.from({ length: shapeCount }, (_, i) => 600 + 10 * i);
    const shape = { kind: "equilibrium" as const, cantingSdDeg: 7.5, sunElevationDeg: 10, arcPositionDeg: 0, rayOnly: false };
    await kernels.rows({ h: 0.05, media, radiiUm, engines: Array.from(radiiUm, () => "airy" as const), shapes: Array.from(radiiUm, () => shape), blocks: [8], within: { first: 800, last: 840 } });
    return seen;
  }

  it("with fewer than 8 shapes a thread each shape is split in its parts (6 at the top of the bow); with 8 or more, or one thread, a task a shape", async () => {
    expect((await tasksFor(15, 2)).length).toBe(15 * 6);
    expect((await tasksFor(16, 2)).length).toBe(16);
    expect((await tasksFor(3, 1)).length).toBe(3);
  });
});
