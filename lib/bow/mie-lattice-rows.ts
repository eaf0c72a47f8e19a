// The Lorenz–Mie rows of a kernel task on the lattice indices lo..hi: drops whose |S|² is slowly varying on the
// lattice are computed on a sub-lattice and interpolated (mie-sub-lattice.ts); the others at every lattice point.
// Drops sharing a sub-lattice factor share one many-drops pass (their angular functions are computed once).

import { mieRows, type CellAverage, type DropRowContext } from "./drop-rows.js";
import { cellSampleRadiusUm } from "./cell-average.js";
import { interpolateSubLattice, subLatticeFactorForSize, subLatticeNodes, subLatticeWeights, type MieSampling } from "./mie-sub-lattice.js";
import { interpolateSubLatticeSimd } from "./simd-sub-lattice.js";
import type { RowArena } from "./row-arena.js";

export interface LatticeRange {
  h: number;
  /** First and last lattice index (ψ = index·h); the context's angles are Θ = 180° − (hi − j)·h, j = 0 … hi − lo. */
  lo: number;
  hi: number;
}

/** The largest size parameter a drop's row is computed for (its cell's largest sub-size with an average). */
function largestSizeParameter(ctx: DropRowContext, drop: { radiusUm: number; average?: CellAverage }): number {
  const samples = drop.average && drop.average.samples > 1 ? drop.average.samples : 1;
  const radiusUm = samples === 1 ? drop.radiusUm : cellSampleRadiusUm(drop.radiusUm, drop.average!, samples - 1);
  return ctx.waveNumberPerM * radiusUm * 1e-6;
}

/**
 * |S1|², |S2|² of each drop at the context's angles (the lattice indices hi down to lo), as mieRows gives them, but
 * drops with a sub-lattice factor c > 1 computed at every c-th lattice index only and interpolated. The term-angles
 * are those actually spent. With an arena (row-arena.ts; reset here) the sub-lattice rows are its scratch arrays, so
 * they are valid until the arena's next use; without one every row is an array of its own.
 */
export function mieLatticeRows(
  ctx: DropRowContext,
  drops: readonly { radiusUm: number; average?: CellAverage }[],
  range: LatticeRange,
  sampling: MieSampling = "adaptive",
  arena?: RowArena,
): { rows: { perp: Float64Array; par: Float64Array }[]; termAngles: number } {
  const { h, lo, hi } = range;
  arena?.reset();
  const row = (length: number) => (arena ? arena.take(length, false) : new Float64Array(length));
  const groups = new Map<number, number[]>();
  drops.forEach((drop, i) => {
    const c = subLatticeFactorForSize(largestSizeParameter(ctx, drop), h, sampling);
    const group = groups.get(c);
    if (group) group.push(i);
    else groups.set(c, [i]);
  });
  const rows: { perp: Float64Array; par: Float64Array }[] = new Array(drops.length);
  let termAngles = 0;
  for (const [c, members] of groups) {
    const list = members.map((i) => drops[i]);
    if (c === 1) {
      const direct = mieRows(ctx, list);
      members.forEach((i, k) => (rows[i] = direct.rows[k]));
      termAngles += direct.termAngles;
      continue;
    }
    const { qLo, qHi } = subLatticeNodes(lo, hi, c);
    // Θ as the lattice writes it (180° − index·h); nodes past 0° or 180° are mirror images (|S|² is even in Θ there).
    const cosTheta = row(qHi - qLo + 1);
    for (let k = 0; k < cosTheta.length; k++) cosTheta[k] = Math.cos(((180 - (qLo + k) * c * h) * Math.PI) / 180);
    const coarse = mieRows(ctx, list, cosTheta, arena);
    termAngles += coarse.termAngles;
    const weights = subLatticeWeights(c);
    members.forEach((i, k) => {
      // Every output is written (a node copied or interpolated): no zeroing needed.
      const perp = row(hi - lo + 1);
      const par = row(hi - lo + 1);
      // The WebAssembly lanes give the same values; the TypeScript loop where WebAssembly SIMD is missing.
      const args = [coarse.rows[k].perp, coarse.rows[k].par, qLo, c, weights, lo, hi, perp, par] as const;
      if (!interpolateSubLatticeSimd(...args)) interpolateSubLattice(...args);
      rows[i] = { perp, par };
    });
  }
  return { rows, termAngles };
}
