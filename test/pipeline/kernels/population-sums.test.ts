// Sums over drops kept by content (KernelService.populationSums): a profile made from them is the profile made from
// the rows, to the last bit, for any request that shares the drops, water and angle lattice; any other request does not
// find them; they stay within their share of the memory budget. The reference is the same computation on a fresh
// kernel service (the rows' own physics is checked against published values elsewhere: test/lib/mie, test/lib/bow).
import { describe, expect, it } from "vitest";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { computeProfile, type ProfileResult } from "../../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../../schemas/profile.js";

const limits = { maxTermAngles: Infinity };
const base = {
  drops: { kind: "lognormal", medianRadiusUm: 150, geometricSd: 1.3, totalNumberPerM3: 1e4 },
  angles: { fromDeg: 38, toDeg: 44, stepDeg: 0.1 },
  spectral: { fromNm: 450, toNm: 530, stepNm: 20 },
};
const fresh = (memoryBudgetBytes = 2 ** 28) => new KernelService({ memoryBudgetBytes, compute: createInlinePool().compute });
const profile = (kernels: KernelService, body: object) => computeProfile(profileRequestSchema.parse({ ...base, ...body }), { kernels, limits });
const bits = (r: ProfileResult) => Buffer.concat([Buffer.from(r.spectral.perpendicular.buffer), Buffer.from(r.spectral.parallel.buffer)]);

describe("sums over drops kept in memory", () => {
  it("the same drops again, under another sun: no row read, the same numbers as from the rows", async () => {
    const kernels = fresh();
    const first = await profile(kernels, {});
    expect(first.meta.kernel.sumsKept).toBe(0);
    expect(first.meta.kernel.computed).toBeGreaterThan(0);
    const again = await profile(kernels, { sun: { elevationDeg: 25 } });
    expect(again.meta.kernel.sumsKept).toBe(5);
    expect(again.meta.kernel.rows).toBe(0);
    expect(again.meta.cache).toBe("hit");
    const reference = await profile(fresh(), { sun: { elevationDeg: 25 } });
    expect(reference.meta.kernel.sumsKept).toBe(0);
    expect(bits(again).equals(bits(reference))).toBe(true);
  });

  it("other drops, water or angle lattice find none of them", async () => {
    const kernels = fresh();
    await profile(kernels, {});
    for (const other of [
      { drops: { ...base.drops, totalNumberPerM3: 2e4 } },
      { water: { temperatureC: 5 } },
      { angles: { fromDeg: 38, toDeg: 44, stepDeg: 0.01 } },
    ]) {
      const r = await profile(kernels, other);
      expect(r.meta.kernel.sumsKept).toBe(0);
      expect(r.meta.kernel.rows).toBeGreaterThan(0);
    }
    // A narrower window on the same lattice reads other lattice points: its sums are its own, made from kept rows.
    const narrower = await profile(kernels, { angles: { fromDeg: 40, toDeg: 44, stepDeg: 0.1 } });
    expect(narrower.meta.kernel.sumsKept).toBe(0);
    expect(narrower.meta.kernel.computed).toBe(0);
  });

  it("rows and sums together stay within the memory budget", async () => {
    const budget = 400_000;
    const kernels = fresh(budget);
    await profile(kernels, {});
    await profile(kernels, { drops: { ...base.drops, medianRadiusUm: 200 } });
    expect(kernels.sums.calculatedSize).toBeGreaterThan(0);
    expect(kernels.memory.calculatedSize + kernels.sums.calculatedSize).toBeLessThanOrEqual(budget);
  });
});
