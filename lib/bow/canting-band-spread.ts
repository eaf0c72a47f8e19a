// The canting mean over the banded rule used near a plane of mirror symmetry (lib/drops/shape/canting.ts
// cantingNodesBanded): as lib/bow/canting-spread.ts does for the five-node rule, each node's bow is spread over the
// folds its own cell of tilts sends it to, keeping the node's weight. The fold's model is local to the node, since the
// rows change across the band in ways no one quadratic follows (2 mm drops at the top of the bow: the secondary's
// edge moves 1.1° between tilts 1.75° and 2° across the plane, where a bright band of tilts ends): along the tilt in
// the sun's vertical plane, the quadratic through the three nodes of its row of the rule (exact for the 3-point rule's
// nodes); across, the slope of the fold between the node's neighbours in its column (central differences, one-sided
// at the ends: common practice). A node whose neighbours lack a fold is not spread that way.

import type { BandedCantingRule, TiltCell1D } from "../drops/shape/canting.js";
import { addSpreadShares, tentKernel } from "./canting-spread.js";

/** Samples per cell and axis; a cell reaching to ±∞ is sampled out to this many σ (normal tail beyond 5σ: 6e-7, common practice). */
const CELL_SAMPLES = 12;
const REACH_SD = 5;

/** Sample points (midpoints of CELL_SAMPLES equal parts of the cell, clipped to ±REACH_SD σ) and their normal masses. */
function cellSamples(cell: TiltCell1D, sdDeg: number): { at: Float64Array; mass: Float64Array; stepDeg: number } {
  const lo = Math.max(cell.loDeg, -REACH_SD * sdDeg);
  const hi = Math.min(cell.hiDeg, REACH_SD * sdDeg);
  const stepDeg = (hi - lo) / CELL_SAMPLES;
  const at = Float64Array.from({ length: CELL_SAMPLES }, (_, k) => lo + (k + 0.5) * stepDeg);
  const mass = at.map((t) => Math.exp(-(t * t) / (2 * sdDeg * sdDeg)) * stepDeg);
  return { at, mass, stepDeg };
}

/**
 * Each node's kernel (tentKernel: shifts of its bow in bins of stepDeg with their shares): the fold's shift over the
 * node's cell (tx cell × ty cell) from the local model. foldsDeg[k]: node k's fold (NaN: none).
 */
export function bandSpreadKernels(rule: BandedCantingRule, foldsDeg: readonly number[], sdDeg: number, stepDeg: number): { first: number; weights: Float64Array }[] {
  const ny = rule.ty.length;
  const fold = (i: number, j: number) => foldsDeg[i * ny + j];
  const nx = rule.tx.length;
  const txCells = rule.tx.map((c) => cellSamples(c, sdDeg));
  const tyCells = rule.ty.map((c) => cellSamples(c, sdDeg));
  return rule.nodes.map((_, k) => {
    const i = Math.floor(k / ny);
    const j = k % ny;
    // Along tx: the quadratic through the folds of node i and its two neighbours in the row (the row's end's three at
    // the ends; Lagrange form), as a shift from node i's fold.
    const first = Math.min(Math.max(0, i - 1), nx - 3);
    const [t0, t1, t2] = [0, 1, 2].map((q) => rule.tx[first + q].atDeg);
    const [f0, f1, f2] = [0, 1, 2].map((q) => fold(first + q, j));
    const alongX = Number.isFinite(f0) && Number.isFinite(f1) && Number.isFinite(f2);
    const quad = (t: number) =>
      (f0 * ((t - t1) * (t - t2))) / ((t0 - t1) * (t0 - t2)) + (f1 * ((t - t0) * (t - t2))) / ((t1 - t0) * (t1 - t2)) + (f2 * ((t - t0) * (t - t1))) / ((t2 - t0) * (t2 - t1));
    const slopeX = (t: number) =>
      (f0 * (2 * t - t1 - t2)) / ((t0 - t1) * (t0 - t2)) + (f1 * (2 * t - t0 - t2)) / ((t1 - t0) * (t1 - t2)) + (f2 * (2 * t - t0 - t1)) / ((t2 - t0) * (t2 - t1));
    // Across: the slope between the column's neighbours.
    const [below, above] = [Math.max(0, j - 1), Math.min(ny - 1, j + 1)];
    const slopeY = (fold(i, above) - fold(i, below)) / (rule.ty[above].atDeg - rule.ty[below].atDeg);
    const gy = Number.isFinite(slopeY) ? slopeY : 0;
    const xs = txCells[i];
    const ys = tyCells[j];
    const base = alongX ? quad(rule.tx[i].atDeg) : 0;
    const count = xs.at.length * ys.at.length;
    const shifts = new Float64Array(count);
    const widths = new Float64Array(count);
    const shares = new Float64Array(count);
    let total = 0;
    xs.at.forEach((tx, a) => {
      ys.at.forEach((ty, b) => {
        const m = a * ys.at.length + b;
        shifts[m] = ((alongX ? quad(tx) - base : 0) + gy * (ty - rule.ty[j].atDeg)) / stepDeg;
        // Each sample's tent as wide as its gap to the neighbouring samples in Θ (canting-spread.ts localSpreadKernels).
        widths[m] = Math.max(1, (Math.abs(alongX ? slopeX(tx) : 0) * xs.stepDeg) / stepDeg, (Math.abs(gy) * ys.stepDeg) / stepDeg);
        shares[m] = xs.mass[a] * ys.mass[b];
        total += shares[m];
      });
    });
    return tentKernel(shifts, widths, shares.map((s) => s / total));
  });
}

/**
 * The canting mean of one order's shares over the banded rule (each share already weighted by its node's weight),
 * written into out: each share spread by its node's bandSpreadKernels kernel. shareOf[k]: the index into shares of
 * node k's share (mirror images share one: lib/bow/plane-canting-nodes.ts). Always true: a node without folds is left
 * unspread, where localCantingMean gives up (the same signature, so that the caller picks either).
 */
export function bandedCantingMean(
  shares: readonly { perp: Float64Array; par: Float64Array }[],
  shareOf: readonly number[],
  rule: BandedCantingRule,
  foldsDeg: readonly number[],
  sdDeg: number,
  stepDeg: number,
  out: { perp: Float64Array; par: Float64Array },
): boolean {
  addSpreadShares(shares, shareOf, rule.nodes, bandSpreadKernels(rule, foldsDeg, sdDeg, stepDeg), out);
  return true;
}
