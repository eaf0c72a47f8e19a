// The canting mean by rotation gives the rows of several places on the bow from one pass over the pupil
// (ShapedRowSpec.siblingArcsDeg): the kernel cache keeps them as those places' rows, which are then found, not
// computed, and are the rows a request for that place alone computes, to the last bit.
import { describe, expect, it } from "vitest";
import { KernelService, type KernelRequest } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { dropMedia } from "../../../lib/water/drop-medium.js";
import { rotationCantingRows, rotationCantingRowsAlong } from "../../../lib/bow/canting-rotation.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import type { ShapedRowSpec } from "../../../lib/bow/shaped-rows.js";

describe("rows at several places on the bow from one pass", () => {
  it("are each place's own rows, bit for bit (a coarse grid)", () => {
    const setup = { outline: equilibriumOutline(1800), sunElevationDeg: 12, cantingSdDeg: 7.5, arcPositionDeg: 0, indexSpan: { min: 1.3284, max: 1.3479 }, grid: { pupilStep: 0.06, elevationsPerSd: 2 } };
    const thetaDeg = Float64Array.from({ length: 200 }, (_, j) => 125.05 + 0.1 * j);
    const drops = [{ mRe: 1.333, x: 2e4 }, { mRe: 1.34, x: 2.1e4 }];
    const along = rotationCantingRowsAlong(setup, [0, 35, 90], drops, thetaDeg, 0.1);
    [0, 35, 90].forEach((arcPositionDeg, a) => {
      const own = rotationCantingRows({ ...setup, arcPositionDeg }, drops, thetaDeg, 0.1);
      own.forEach((row, d) => {
        expect(Array.from(along[a][d].perp)).toEqual(Array.from(row.perp));
        expect(Array.from(along[a][d].par)).toEqual(Array.from(row.par));
      });
    });
    expect(Math.max(...along[1][0].perp)).toBeGreaterThan(0);
  });

  it("are kept by the kernel cache as the other places' rows and found there, the rows a request for that place computes", async () => {
    const { media } = dropMedia({ temperatureC: 15, salinityPsu: 0 }, [550]);
    const spec: ShapedRowSpec = { kind: "equilibrium", cantingSdDeg: 7.5, sunElevationDeg: 10, arcPositionDeg: 0, rayOnly: false, cantingRotation: true };
    const request = (shape: ShapedRowSpec): KernelRequest => ({ h: 0.05, media, radiiUm: Float64Array.from([1500]), engines: ["airy"], shapes: [shape], blocks: [8], within: { first: 800, last: 840 } });
    const service = (parallelism: number) => new KernelService({ memoryBudgetBytes: 2 ** 28, parallelism, compute: createInlinePool().compute });

    const shared = service(2);
    await shared.rows(request({ ...spec, siblingArcsDeg: [0, 40] }));
    const found = await shared.rows(request({ ...spec, arcPositionDeg: 40 }));
    expect(found.stats.computed).toBe(0);
    expect(found.stats.memoryHits).toBe(1);

    const alone = await service(1).rows(request({ ...spec, arcPositionDeg: 40 }));
    expect(alone.stats.computed).toBe(1);
    expect(Array.from(found.get(0, 0, 8))).toEqual(Array.from(alone.get(0, 0, 8)));
  }, 300_000);
});
