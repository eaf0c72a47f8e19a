import { describe, it, expect } from "vitest";
import { RowArena } from "../../../lib/bow/row-arena.js";
import { dropRowContext } from "../../../lib/bow/drop-rows.js";
import { mieLatticeRows } from "../../../lib/bow/mie-lattice-rows.js";
import { kernelRows } from "../../../lib/bow/kernel-rows.js";

// Scratch rows reused from one kernel task to the next: a task's rows must be the same to the bit as rows computed
// in fresh arrays, whatever the previous task held, and the rows a task returns must not change with the next task.
// (Bit equality is the check: the arena changes where values are stored, never how they are computed.)

const H = 0.05;
const WATER_550 = { wavelengthNm: 550, mRe: 1.3333, mIm: 1.96e-9, nAir: 1.000277 };
const WATER_420 = { wavelengthNm: 420, mRe: 1.3394, mIm: 1e-3, nAir: 1.000283 };

function context(medium: typeof WATER_550, lo: number, hi: number) {
  const thetaDeg = Float64Array.from({ length: hi - lo + 1 }, (_, j) => 180 - (hi - j) * H);
  return dropRowContext(medium, thetaDeg, H, new Set(["mie"]));
}

const bits = (a: Float64Array) => Array.from(new Uint32Array(a.buffer, a.byteOffset, 2 * a.length));

describe("Row arena", () => {
  it("hands out zeroed arrays that do not overlap, grows past a chunk and reuses the memory after a reset", () => {
    const arena = new RowArena(100);
    const a = arena.take(60);
    a.fill(1);
    const b = arena.take(60);
    expect(Array.from(b)).toEqual(new Array(60).fill(0));
    b.fill(2);
    expect(a.every((v) => v === 1)).toBe(true);
    const c = arena.take(500);
    expect(c.length).toBe(500);
    expect(a.every((v) => v === 1) && b.every((v) => v === 2)).toBe(true);
    arena.reset();
    // After a reset one chunk holds everything taken before: the same requests fit without growing.
    const again = [arena.take(60, false), arena.take(60, false), arena.take(500, false)];
    expect(again[0].buffer).toBe(again[2].buffer);
    expect(again[0].length + again[1].length + again[2].length).toBe(620);
  });

  it("gives two consecutive Lorenz–Mie lattice calls with different drops the rows of fresh calls, to the bit", () => {
    const arena = new RowArena(1000);
    const calls = [
      { medium: WATER_550, lo: 400, hi: 1200, drops: [{ radiusUm: 4 }, { radiusUm: 12, average: { samples: 8, widthLn: 0.3 } }, { radiusUm: 40 }] },
      { medium: WATER_420, lo: 500, hi: 700, drops: [{ radiusUm: 25, average: { samples: 4, widthLn: 0.1 } }, { radiusUm: 6 }] },
      { medium: WATER_550, lo: 400, hi: 1200, drops: [{ radiusUm: 9 }] },
    ];
    for (const { medium, lo, hi, drops } of calls) {
      const ctx = context(medium, lo, hi);
      const fresh = mieLatticeRows(ctx, drops, { h: H, lo, hi });
      const reused = mieLatticeRows(ctx, drops, { h: H, lo, hi }, "adaptive", arena);
      expect(reused.termAngles).toBe(fresh.termAngles);
      drops.forEach((_, i) => {
        expect(bits(reused.rows[i].perp)).toEqual(bits(fresh.rows[i].perp));
        expect(bits(reused.rows[i].par)).toEqual(bits(fresh.rows[i].par));
      });
    }
  });

  it("leaves a kernel task's rows unchanged by the next task on the same thread, and gives a repeated task the same rows", () => {
    const task = (medium: typeof WATER_550, radii: number[]) => ({
      medium,
      h: H,
      items: radii.map((radiusUm) => ({ radiusUm, engine: "mie" as const, blocks: [8, 9, 10], average: { samples: 8, widthLn: 0.2 } })),
    });
    const first = kernelRows(task(WATER_550, [5, 10, 20]));
    const kept = first.rows.map((blocks) => blocks.map((row) => Float64Array.from(row)));
    const second = kernelRows(task(WATER_420, [3, 30]));
    first.rows.forEach((blocks, i) => blocks.forEach((row, b) => expect(bits(row)).toEqual(bits(kept[i][b]))));
    const repeated = kernelRows(task(WATER_550, [5, 10, 20]));
    repeated.rows.forEach((blocks, i) => blocks.forEach((row, b) => expect(bits(row)).toEqual(bits(kept[i][b]))));
    expect(second.rows[0][0]).not.toEqual(first.rows[0][0]);
  });
});
