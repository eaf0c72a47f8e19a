// A flattened drops' kernel task of one shape spread over threads by canting node: every plane traced once, the rows
// the same to the last bit as one task's, and the cost estimate's plane count the count the tasks report.
import { describe, expect, it } from "vitest";
import { cantingRuns } from "../../../pipeline/kernels/canting-parts.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import type { KernelTask } from "../../../pipeline/kernels/kernel-types.js";
import { computeProfile, toDistribution } from "../../../pipeline/compute/profile.js";
import { planDropShapes, shapedPlaneCounts } from "../../../pipeline/compute/drop-shape-plan.js";
import { latticeRadiusQuadrature } from "../../../lib/drops/lattice-quadrature.js";
import { INDEX_NODES } from "../../../lib/bow/shaped-rows.js";
import { profileRequestSchema } from "../../../schemas/profile.js";

describe("canting runs", () => {
  it("cut the nodes into consecutive runs, as even as they go, never more runs than nodes", () => {
    expect(cantingRuns(5, 2)).toEqual([[0, 1], [2, 3, 4]]);
    expect(cantingRuns(5, 3)).toEqual([[0], [1, 2], [3, 4]]);
    expect(cantingRuns(5, 8)).toEqual([[0], [1], [2], [3], [4]]);
    expect(cantingRuns(1, 2)).toEqual([[0]]);
    expect(cantingRuns(5, 1)).toEqual([[0, 1, 2, 3, 4]]);
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
    const result = await computeProfile(request, { kernels, limits: { maxTermAngles: Infinity } });
    return { result, seen, planes };
  }

  it("is split by canting node (2 + 3 nodes, every wavelength in each), traces each plane once as the estimate counts, and gives one task's rows bit for bit", async () => {
    const two = await run(2);
    expect(two.seen.length).toBe(2);
    expect(two.seen.map((task) => [...new Set(task.items.map((item) => item.cantingNode))])).toEqual([[0, 1], [2, 3, 4]]);
    for (const task of two.seen) expect(new Set(task.items.map((item) => item.medium?.wavelengthNm ?? task.medium.wavelengthNm)).size).toBe(2);

    const plan = planDropShapes(request, latticeRadiusQuadrature(toDistribution(request.drops)).radiiUm);
    const estimate = shapedPlaneCounts(plan, 2);
    // One shape, five canting nodes: 5 × INDEX_NODES traced planes, 5 × 2 interpolated.
    expect(estimate).toEqual({ traced: 5 * INDEX_NODES, interpolated: 10 });
    expect(two.planes).toEqual(estimate);

    const one = await run(1);
    expect(one.seen.length).toBe(1);
    expect(one.planes).toEqual(estimate);
    expect(Array.from(two.result.spectral.perpendicular)).toEqual(Array.from(one.result.spectral.perpendicular));
    expect(Array.from(two.result.spectral.parallel)).toEqual(Array.from(one.result.spectral.parallel));
  }, 600_000);
});
