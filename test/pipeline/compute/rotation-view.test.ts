// A camera view of drops whose canting mean is taken by rotation over the pupil (lib/bow/canting-rotation.ts): its
// arc nodes' rows come from one pass, asked by the first node (ShapedRowSpec.siblingArcsDeg); the others find theirs
// in the kernel cache. That the rows so found are each node's own is checked bit for bit in
// test/pipeline/kernels/rotation-siblings.test.ts.
import { describe, expect, it } from "vitest";
import { viewRequestSchema } from "../../../schemas/view.js";
import { prepareView, type ViewDeps } from "../../../pipeline/compute/view.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import type { KernelTask } from "../../../pipeline/kernels/kernel-types.js";

describe("a view of large canted drops", () => {
  it("computes the rotation's rows once, at the first arc node, for every node", async () => {
    const seen: KernelTask[] = [];
    const inline = createInlinePool().compute;
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: async (task, signal) => (seen.push(task), inline(task, signal)) });
    const deps: ViewDeps = { kernels, limits: { maxTermAngles: Infinity } };
    const body = viewRequestSchema.parse({
      scenario: { drops: { kind: "monodisperse", radiusUm: 1500, numberPerM3: 1000, shape: { kind: "equilibrium" } }, spectral: { fromNm: 540, toNm: 560, stepNm: 20 } },
      sun: { azimuthDeg: 240, elevationDeg: 10 },
      // Towards the bow's left side, 30° wide: it spans several arc nodes 5° apart.
      camera: { yawDeg: 10, pitchDeg: 5, widthPx: 24, heightPx: 16, horizontalFovDeg: 30 },
      ground: false,
      layer: "additive",
    });
    const prepared = await prepareView(body, "exr", deps);
    const nodes = prepared.manifest.arcPositions!.nodesDeg;
    expect(nodes.length).toBeGreaterThan(2);
    const rotated = seen.filter((task) => task.items.some((item) => item.shape?.cantingRotation));
    expect(rotated.length).toBeGreaterThan(0);
    expect(new Set(rotated.map((task) => task.items[0].shape!.arcPositionDeg))).toEqual(new Set([nodes[0]]));
    expect(rotated[0].items[0].shape!.siblingArcsDeg).toEqual(nodes);
  }, 300_000);
});
