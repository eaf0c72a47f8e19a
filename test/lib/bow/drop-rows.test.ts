import { describe, it, expect } from "vitest";
import { dropRow, dropRowContext, mieRows } from "../../../lib/bow/drop-rows.js";

// The profile's Lorenz–Mie rows, many drops per pass (mieRows), against the drop-by-drop path (dropRow): the same
// |S1|², |S2|² to the bit, single sizes and means over a radius cell alike (the kernels themselves are checked
// against the mpmath reference in test/lib/mie/).
describe("Lorenz–Mie kernel rows, many drops per pass", () => {
  it("equal dropRow bit for bit, with and without cell averages, over more drops than one pass holds", () => {
    const thetaDeg = Float64Array.from({ length: 203 }, (_, j) => 118 + 0.2 * j);
    const ctx = dropRowContext({ wavelengthNm: 520, mRe: 1.335, mIm: 2e-9, nAir: 1.00027 }, thetaDeg, 0.2, new Set(["mie"]));
    const drops = Array.from({ length: 70 }, (_, i) => ({
      radiusUm: 2 * Math.exp(0.05 * i),
      average: i % 3 === 0 ? { samples: 4, widthLn: 0.05 } : undefined,
    }));
    const batch = mieRows(ctx, drops);
    const perp = new Float64Array(thetaDeg.length);
    const par = new Float64Array(thetaDeg.length);
    let termAngles = 0;
    drops.forEach((drop, i) => {
      termAngles += dropRow(ctx, "mie", drop.radiusUm, perp, par, drop.average);
      expect(batch.rows[i].perp, `drop ${i}`).toEqual(perp);
      expect(batch.rows[i].par, `drop ${i}`).toEqual(par);
    });
    expect(batch.termAngles).toBe(termAngles);
  });
});
