// Kernel rows of several profiles asked for together (a lookup texture's rows) are the rows each profile would
// get on its own, also where two profiles want one radius with different engines.
import { describe, it, expect } from "vitest";
import { KernelService, type KernelRequest } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { sharedKernelRows } from "../../../pipeline/kernels/shared-rows.js";
import { dropMedia } from "../../../lib/water/drop-medium.js";
import { latticeSpan, blocksOf } from "../../../lib/bow/kernel-grid.js";
import { profileDefaults } from "../../../schemas/profile.js";

const h = 0.05;
const span = latticeSpan(40, 43, h);
const { media } = dropMedia(profileDefaults.water, Float64Array.of(450, 650));
const base = { h, media, blocks: blocksOf(span), within: { first: span.first, last: span.last } };
const requestA: KernelRequest = { ...base, radiiUm: Float64Array.of(120, 400), engines: ["mie", "airy"] };
// 400 µm again, by another engine: a second variant of the same radius.
const requestB: KernelRequest = { ...base, radiiUm: Float64Array.of(400, 800), engines: ["geometric", "airy"] };

describe("sharedKernelRows", () => {
  it("gives each request the rows it would get alone, for every wavelength, radius and block", async () => {
    const compute = createInlinePool().compute;
    let tasks = 0;
    const counting: typeof compute = (task, signal) => {
      tasks++;
      return compute(task, signal);
    };
    const shared = await sharedKernelRows(new KernelService({ memoryBudgetBytes: 2 ** 26, compute: counting }), [requestA, requestB]);
    // One task per wavelength and layer: 400 µm by two engines needs two layers.
    expect(tasks).toBe(2 * media.length);
    for (const [r, request] of [requestA, requestB].entries()) {
      const alone = await new KernelService({ memoryBudgetBytes: 2 ** 26, compute }).rows(request);
      for (let l = 0; l < media.length; l++) {
        for (let i = 0; i < request.radiiUm.length; i++) {
          for (const b of request.blocks) expect(shared[r].get(l, i, b)).toEqual(alone.get(l, i, b));
        }
      }
    }
    // The two 400 µm rows differ (ray optics has no interference), so they did not share one slot.
    expect(shared[0].get(0, 1, base.blocks[0])).not.toEqual(shared[1].get(0, 0, base.blocks[0]));
  });
});
