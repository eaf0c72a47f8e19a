// The work of one kernel task: per-drop β⊥, β∥ = |S1|²/(2k²), |S2|²/(2k²) (Bohren & Huffman 1983 Eq. 3.12 with
// unpolarised light split evenly) for several drops at one wavelength, over lattice blocks, ψ ascending.

import type { DropEngine } from "./volume-scattering.js";
import { blockRange, thetaOfBlocks } from "./kernel-grid.js";
import { dropRow, dropRowContext } from "./drop-rows.js";

export interface KernelRowsInput {
  medium: { wavelengthNm: number; mRe: number; mIm: number; nAir: number };
  h: number;
  items: { radiusUm: number; engine: DropEngine; blocks: number[] }[];
}

export function kernelRows(input: KernelRowsInput): { rows: Float64Array[][]; mieTermAngles: number } {
  const { medium, h, items } = input;
  const allBlocks = [...new Set(items.flatMap((it) => it.blocks))].sort((a, b) => a - b);
  const thetaDeg = thetaOfBlocks(allBlocks, h);
  const nTheta = thetaDeg.length;
  // Position of each lattice index in the Θ-ascending grid (ψ descending).
  const psiIndexAt = new Map<number, number>();
  thetaDeg.forEach((t, j) => psiIndexAt.set(Math.round((180 - t) / h), j));
  const ctx = dropRowContext(medium, thetaDeg, h, new Set(items.map((it) => it.engine)));
  const perDrop = 1 / (2 * ctx.waveNumberPerM * ctx.waveNumberPerM);
  const perp = new Float64Array(nTheta);
  const par = new Float64Array(nTheta);
  let mieTermAngles = 0;
  const rows = items.map((item) => {
    mieTermAngles += dropRow(ctx, item.engine, item.radiusUm, perp, par);
    return item.blocks.map((b) => {
      const { first, count } = blockRange(b, h);
      const row = new Float64Array(2 * count);
      for (let k = 0; k < count; k++) {
        const j = psiIndexAt.get(first + k)!;
        row[k] = perDrop * perp[j];
        row[count + k] = perDrop * par[j];
      }
      return row;
    });
  });
  return { rows, mieTermAngles };
}
