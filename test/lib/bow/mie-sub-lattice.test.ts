import { describe, it, expect } from "vitest";
import { dropRowContext } from "../../../lib/bow/drop-rows.js";
import { mieLatticeRows } from "../../../lib/bow/mie-lattice-rows.js";
import { mieTermCount } from "../../../lib/mie/termCount.js";
import { kaiserSincWeights, subLatticeFactor, subLatticeWeights, SUB_LATTICE_KAISER_BETA, SUB_LATTICE_PERIOD_FRACTION, SUB_LATTICE_POINTS } from "../../../lib/bow/mie-sub-lattice.js";

// Lorenz–Mie rows of small drops computed on a sub-lattice and interpolated, against the same rows computed at every
// lattice point (whose kernels are checked against the mpmath reference and published tables in test/lib/mie/).
// |S1|², |S2|² are cosine polynomials of degree ≤ 2N in Θ (Bohren & Huffman 1983 eqs 4.46–4.47), so a sub-lattice
// step of 0.4 of their shortest period 180°/N resolves them; the interpolation error measured over x = 20–660
// (bench/mie-sub-lattice.ts) is ≤ 2.4e-8 of the row's peak: 1e-7 of the peak allowed here.
const TOLERANCE_OF_PEAK = 1e-7;
const H = 0.05;

function rowsBoth(
  medium: { wavelengthNm: number; mRe: number; mIm: number; nAir: number },
  lo: number,
  hi: number,
  drops: { radiusUm: number; average?: { samples: number; widthLn: number } }[],
  order?: number,
  h = H,
) {
  const thetaDeg = Float64Array.from({ length: hi - lo + 1 }, (_, j) => 180 - (hi - j) * h);
  const ctx = dropRowContext(medium, thetaDeg, h, new Set(["mie"]), order);
  return {
    sub: mieLatticeRows(ctx, drops, { h, lo, hi }),
    direct: mieLatticeRows(ctx, drops, { h, lo, hi }, "lattice"),
  };
}

function worstOfPeak(a: Float64Array, b: Float64Array): number {
  const peak = Math.max(...b);
  let worst = 0;
  for (let j = 0; j < a.length; j++) worst = Math.max(worst, Math.abs(a[j] - b[j]) / peak);
  return worst;
}

const WATER_550 = { wavelengthNm: 550, mRe: 1.3333, mIm: 1.96e-9, nAir: 1.000277 };

describe("Lorenz–Mie rows on a sub-lattice", () => {
  it("choose a step of at most 0.4 of the shortest period 180°/N, and no sub-lattice where that is under two lattice steps", () => {
    for (const x of [5, 30, 120, 400, 700, 3000]) {
      const n = mieTermCount(x);
      const c = subLatticeFactor(n, H);
      expect(c).toBeGreaterThanOrEqual(1);
      if (c > 1) expect(c * H).toBeLessThanOrEqual((SUB_LATTICE_PERIOD_FRACTION * 180) / n);
      expect((c + 1) * H).toBeGreaterThan((SUB_LATTICE_PERIOD_FRACTION * 180) / n);
    }
    expect(subLatticeFactor(mieTermCount(3000), H)).toBe(1);
  });

  it("interpolate with weights that keep a constant and reproduce a sampled cosine well below the Nyquist limit", () => {
    const c = 7;
    const w = subLatticeWeights(c);
    expect(w).toEqual(kaiserSincWeights(c, SUB_LATTICE_POINTS, SUB_LATTICE_KAISER_BETA));
    for (let r = 1; r < c; r++) {
      let sum = 0;
      let cosine = 0;
      // cos(2π f t) with f = 0.3 cycles per node: samples at the nodes k, the value at t = r/c.
      for (let k = 0; k < SUB_LATTICE_POINTS; k++) {
        sum += w[r * SUB_LATTICE_POINTS + k];
        cosine += w[r * SUB_LATTICE_POINTS + k] * Math.cos(2 * Math.PI * 0.3 * (k + 1 - SUB_LATTICE_POINTS / 2));
      }
      expect(sum).toBeCloseTo(1, 14);
      expect(Math.abs(cosine - Math.cos(2 * Math.PI * 0.3 * (r / c)))).toBeLessThan(1e-6);
    }
  });

  it("match the rows computed at every lattice point over the bows, fog to drizzle, absorbing or not", () => {
    const drops = [2, 5, 10, 20, 30].map((radiusUm) => ({ radiusUm }));
    for (const medium of [WATER_550, { ...WATER_550, wavelengthNm: 400, mRe: 1.3435, mIm: 1e-3 }]) {
      const { sub, direct } = rowsBoth(medium, 400, 1200, drops);
      drops.forEach((_, i) => {
        expect(worstOfPeak(sub.rows[i].perp, direct.rows[i].perp), `drop ${i}`).toBeLessThan(TOLERANCE_OF_PEAK);
        expect(worstOfPeak(sub.rows[i].par, direct.rows[i].par), `drop ${i}`).toBeLessThan(TOLERANCE_OF_PEAK);
      });
      // Fewer term-angles: the point of it (30 µm at 400 nm has c = 1 and costs the same).
      expect(sub.termAngles).toBeLessThan(0.6 * direct.termAngles);
    }
  });

  it("match them at both ends of the lattice (nodes past 0° and 180° are mirror images), for cell means and Debye orders", () => {
    const drops = [{ radiusUm: 3 }, { radiusUm: 8, average: { samples: 4, widthLn: Math.LN10 / 64 } }];
    const last = Math.round(180 / H);
    for (const [lo, hi] of [[0, 150], [last - 150, last]]) {
      for (const order of [undefined, 2]) {
        const { sub, direct } = rowsBoth(WATER_550, lo, hi, drops, order);
        drops.forEach((_, i) => {
          expect(worstOfPeak(sub.rows[i].perp, direct.rows[i].perp), `drop ${i}, ψ index ${lo}–${hi}, order ${order}`).toBeLessThan(TOLERANCE_OF_PEAK);
          expect(worstOfPeak(sub.rows[i].par, direct.rows[i].par), `drop ${i}, ψ index ${lo}–${hi}, order ${order}`).toBeLessThan(TOLERANCE_OF_PEAK);
        });
      }
    }
  });

  it("match them on the finer 0.01° lattice, where larger drops get a sub-lattice too (80 µm at 550 nm: N = 975, c = 7; ψ 38–42°)", () => {
    const drops = [{ radiusUm: 1 }, { radiusUm: 80 }];
    const { sub, direct } = rowsBoth(WATER_550, 3800, 4200, drops, undefined, 0.01);
    drops.forEach((_, i) => {
      expect(worstOfPeak(sub.rows[i].perp, direct.rows[i].perp), `drop ${i}`).toBeLessThan(TOLERANCE_OF_PEAK);
      expect(worstOfPeak(sub.rows[i].par, direct.rows[i].par), `drop ${i}`).toBeLessThan(TOLERANCE_OF_PEAK);
    });
    expect(sub.termAngles).toBeLessThan(0.25 * direct.termAngles);
  });

  it("give a lattice point the same value whatever span the task covers (cache packs merge rows of different spans)", () => {
    const drops = [{ radiusUm: 6 }, { radiusUm: 15 }];
    const wide = rowsBoth(WATER_550, 500, 1100, drops).sub;
    const narrow = rowsBoth(WATER_550, 777, 803, drops).sub;
    drops.forEach((_, i) => {
      for (let index = 777; index <= 803; index++) {
        expect(narrow.rows[i].perp[803 - index]).toBe(wide.rows[i].perp[1100 - index]);
        expect(narrow.rows[i].par[803 - index]).toBe(wide.rows[i].par[1100 - index]);
      }
    });
  });
});
