// The canting mean of a flattened drop's bow. A tilt of the drop's axis moves the bow of each order by degrees
// (1 mm drops half-way up the bow: the primary's fold at 32.0–37.5° over the five canting nodes of ±13°), far more
// than the bow's width, so a quadrature over tilts that adds the nodes' rows as they are draws one bow per node
// where nature has one broad bow: the rule is exact for integrands smooth in the tilt (cantingNodesFive), and a row
// seen at a fixed angle is not. The fold angle Θ_R(t) itself is smooth in the tilt t (the quadratic through the five
// nodes' folds stays within 0.4° of traced folds out to ±13°, 1 mm drops at the top of the bow), and so is the bow's
// shape around its fold. So each node's row stands for the tilts of its own cell (the tilts nearer it than any other
// node) and is spread over the fold angles that cell's tilts send the bow to, Θ_R(t) − Θ_R(t_k) under the Gaussian
// tilt (Huang, Bringi & Thurai 2008: σ in each of two vertical planes), keeping its rule weight (localCantingMean).
// Measured against a dense grid of traced tilts (bench/canting-spread.ts), this kept a smaller summed error than
// aligning every node's bow on the upright node's and spreading their mean over the fold's whole distribution (1 mm
// drops, σ 7.5°: 0.112 and 0.057 of the reference at the top and half-way up, against 0.144 and 0.086). Spreading a
// feature over the distribution of its displacement is common practice (displacement interpolation). Without
// canting, or for spheres (every node's fold the same), the rows stay as they are.

import type { CantingNode } from "../drops/shape/canting.js";

/** Θ_R(tx, ty) = c + gx·tx + gy·ty + ½hx·tx² + ½hy·ty² (degrees of Θ over degrees of tilt). */
export interface FoldOverTilt {
  c: number;
  gx: number;
  gy: number;
  hx: number;
  hy: number;
}

/**
 * The quadratic through the folds of the five-node rule's nodes (cantingNodesFive: the centre and ±a on each axis):
 * central differences, exact for a quadratic without the cross term (which the rule cannot see). null when a node
 * has no fold (the bow left the grid, or the order was not traced as a bow).
 */
export function foldOverTilt(nodes: readonly CantingNode[], foldsDeg: readonly number[]): FoldOverTilt | null {
  if (nodes.length !== 5 || foldsDeg.some((f) => !Number.isFinite(f))) return null;
  const at = (tx: number, ty: number) => foldsDeg[nodes.findIndex((n) => Math.sign(n.tiltXDeg) === tx && Math.sign(n.tiltYDeg) === ty)];
  const a = nodes[1].tiltXDeg;
  const c = at(0, 0);
  const [xp, xm, yp, ym] = [at(1, 0), at(-1, 0), at(0, 1), at(0, -1)];
  return { c, gx: (xp - xm) / (2 * a), gy: (yp - ym) / (2 * a), hx: (xp + xm - 2 * c) / (a * a), hy: (yp + ym - 2 * c) / (a * a) };
}

/**
 * Tilts sampled per axis for the spread, over ±TILT_SPAN_SD σ (0.25σ apart: for σ 7.5°, 1.9°, finer than the 0.05°
 * bins the kernels land on only where Θ_R moves by less than 0.03° per degree of tilt; elsewhere each sample is spread
 * over the gap to its neighbours, localSpreadKernels);
 * ±5σ leaves out 6e-7 of the weight (normal tail: common practice).
 */
const TILT_SAMPLES = 41;
const HALF = (TILT_SAMPLES - 1) / 2;
const TILT_SPAN_SD = 5;

/**
 * Each node's share of the spread: tilts sampled on a grid of TILT_SAMPLES² over ±TILT_SPAN_SD σ, each with its
 * Gaussian weight, are given to their nearest node (its Voronoi cell), and node k's kernel is the distribution of Θ_R(t) − Θ_R(t_k) over its cell, on bins of stepDeg,
 * normalised to 1 (each node keeps its rule weight). kernels[k]: weights[m] for a shift of (first + m) bins.
 */
export function localSpreadKernels(model: FoldOverTilt, nodes: readonly CantingNode[], sdDeg: number, stepDeg: number): { first: number; weights: Float64Array }[] {
  const fold = (tx: number, ty: number) => model.gx * tx + model.gy * ty + 0.5 * (model.hx * tx * tx + model.hy * ty * ty);
  const cells = tiltCells(nodes, sdDeg);
  // Where Θ_R moves fast with the tilt, neighbouring tilt samples land bins apart: each sample's mass is then spread
  // as a tent as wide as the larger of its gaps to its neighbours in Θ_R (in bins), so that the samples' tents tile
  // the bins between them instead of leaving a comb (cloud-in-cell with the grid's own spacing: common practice).
  // Where a gap is under a bin the tent is one bin wide: linear interpolation between the two bins about the sample.
  const tiltStepDeg = (sdDeg * TILT_SPAN_SD) / HALF;
  return nodes.map((n, q) => {
    const { tx, ty, mass, total } = cells[q];
    const base = fold(n.tiltXDeg, n.tiltYDeg);
    const shifts = Float64Array.from(tx, (x, i) => (fold(x, ty[i]) - base) / stepDeg);
    const widths = Float64Array.from(tx, (x, i) =>
      Math.max(1, (Math.abs(model.gx + model.hx * x) * tiltStepDeg) / stepDeg, (Math.abs(model.gy + model.hy * ty[i]) * tiltStepDeg) / stepDeg),
    );
    return tentKernel(shifts, widths, mass.map((m) => m / total));
  });
}

/**
 * The kernel of samples of the fold's shift (in bins) with their shares of a node's mass: each sample's share spread as
 * a tent widths[i] bins wide about its shift (1: linear interpolation between the two bins about it), so that samples
 * that land bins apart tile the bins between them instead of leaving a comb (cloud-in-cell: common practice).
 * weights[m]: the share of a shift of (first + m) bins.
 */
export function tentKernel(shifts: Float64Array, widths: Float64Array, shares: Float64Array): { first: number; weights: Float64Array } {
  let low = Infinity;
  let high = -Infinity;
  shifts.forEach((shift, i) => {
    // A one-bin tent touches floor(shift) and the bin above it only.
    const reach = widths[i] === 1 ? 0 : widths[i];
    low = Math.min(low, shift - reach);
    high = Math.max(high, shift + reach);
  });
  const first = Math.floor(low);
  const weights = new Float64Array(Math.floor(high) - first + 2);
  shifts.forEach((shift, i) => {
    const share = shares[i];
    const w = widths[i];
    if (w === 1) {
      const k = Math.floor(shift);
      const f = shift - k;
      weights[k - first] += (1 - f) * share;
      weights[k - first + 1] += f * share;
      return;
    }
    // The tent 1 − |k − shift|/w at the bins under it, normalised to the sample's share.
    const k0 = Math.ceil(shift - w);
    const k1 = Math.floor(shift + w);
    let norm = 0;
    for (let k = k0; k <= k1; k++) norm += 1 - Math.abs(k - shift) / w;
    for (let k = k0; k <= k1; k++) weights[k - first] += ((1 - Math.abs(k - shift) / w) / norm) * share;
  });
  return { first, weights };
}

/** Each node's cell of sampled tilts (tx, ty in degrees) with their Gaussian masses and the cell's total mass. */
interface TiltCell {
  tx: Float64Array;
  ty: Float64Array;
  mass: Float64Array;
  total: number;
}

/**
 * The tilts sampled on a grid of TILT_SAMPLES² over ±TILT_SPAN_SD σ, each with its Gaussian weight, given to their
 * nearest node (its Voronoi cell). They depend on the nodes and σ alone, not on the folds: kept for the last nodes asked
 * for, which every drop of a task shares.
 */
let lastCells: { nodes: readonly CantingNode[]; sdDeg: number; cells: TiltCell[] } | null = null;
function tiltCells(nodes: readonly CantingNode[], sdDeg: number): TiltCell[] {
  const same = lastCells !== null && lastCells.sdDeg === sdDeg && lastCells.nodes.length === nodes.length && lastCells.nodes.every((n, q) => n.tiltXDeg === nodes[q].tiltXDeg && n.tiltYDeg === nodes[q].tiltYDeg);
  if (same) return lastCells!.cells;
  const members: { tx: number[]; ty: number[]; mass: number[] }[] = nodes.map(() => ({ tx: [], ty: [], mass: [] }));
  // Tilts symmetric to the last bit about 0 (an integer over HALF), so that mirror-image cells get mirror-image kernels.
  const at = (i: number) => (sdDeg * TILT_SPAN_SD * (i - HALF)) / HALF;
  for (let i = 0; i < TILT_SAMPLES; i++) {
    const tx = at(i);
    for (let k = 0; k < TILT_SAMPLES; k++) {
      const ty = at(k);
      let nearest = 0;
      let best = Infinity;
      for (let q = 0; q < nodes.length; q++) {
        const d = (tx - nodes[q].tiltXDeg) ** 2 + (ty - nodes[q].tiltYDeg) ** 2;
        if (d < best) {
          best = d;
          nearest = q;
        }
      }
      members[nearest].tx.push(tx);
      members[nearest].ty.push(ty);
      members[nearest].mass.push(Math.exp(-(tx * tx + ty * ty) / (2 * sdDeg * sdDeg)));
    }
  }
  const cells = members.map((m) => ({ tx: Float64Array.from(m.tx), ty: Float64Array.from(m.ty), mass: Float64Array.from(m.mass), total: m.mass.reduce((sum, v) => sum + v, 0) }));
  lastCells = { nodes: nodes.map((n) => ({ ...n })), sdDeg, cells };
  return cells;
}

/**
 * Adds row convolved with kernel (a shift of first + m bins weighted weights[m]) to out, held at the ends. Shift by
 * shift: each weight's whole shifted row is added at once, the bins that read past the row's ends apart, so that the
 * inner loop runs over contiguous bins without bounds (measured: the canting mean was 18 % of a 1 mm drop's CPU with
 * the sum over shifts innermost).
 */
function addSpread(row: Float64Array, kernel: { first: number; weights: Float64Array }, out: Float64Array): void {
  const count = out.length;
  const lastRow = row[count - 1];
  for (let m = 0; m < kernel.weights.length; m++) {
    const w = kernel.weights[m];
    if (w === 0) continue;
    const shift = kernel.first + m;
    // out[j] reads row[j − shift]: below 0 for j < shift, past the end for j > count − 1 + shift.
    const lo = Math.min(count, Math.max(0, shift));
    const hi = Math.max(lo, Math.min(count, count + shift));
    for (let j = 0; j < lo; j++) out[j] += w * row[0];
    for (let j = lo; j < hi; j++) out[j] += w * row[j - shift];
    for (let j = hi; j < count; j++) out[j] += w * lastRow;
  }
}

/**
 * The canting mean of one order's shares (each already weighted by its node's weight), written into out: each share
 * spread by its node's localSpreadKernels kernel. nodes and foldsDeg: the five nodes of cantingNodesFive and each one's
 * fold (Θ_R, degrees); shareOf[k]: the index into shares of node k's share (two nodes that are mirror images share one:
 * lib/bow/plane-canting-nodes.ts). false, with out untouched, when the folds do not make a model (foldOverTilt): the
 * caller adds the shares as they are.
 */
export function localCantingMean(
  shares: readonly { perp: Float64Array; par: Float64Array }[],
  shareOf: readonly number[],
  nodes: readonly CantingNode[],
  foldsDeg: readonly number[],
  sdDeg: number,
  stepDeg: number,
  out: { perp: Float64Array; par: Float64Array },
): boolean {
  const model = foldOverTilt(nodes, foldsDeg);
  if (!model) return false;
  addSpreadShares(shares, shareOf, nodes, localSpreadKernels(model, nodes, sdDeg, stepDeg), out);
  return true;
}

/**
 * out = Σ over nodes of their shares spread by their kernels (each share already weighted by its node's weight). A share
 * standing for two mirror-image nodes carries both weights and both cells' kernels (equal by the mirror): each kernel
 * is added with its node's part of the share's weight.
 */
export function addSpreadShares(
  shares: readonly { perp: Float64Array; par: Float64Array }[],
  shareOf: readonly number[],
  nodes: readonly CantingNode[],
  kernels: readonly { first: number; weights: Float64Array }[],
  out: { perp: Float64Array; par: Float64Array },
): void {
  out.perp.fill(0);
  out.par.fill(0);
  const done = new Set<number>();
  nodes.forEach((_, k) => {
    const s = shareOf[k];
    if (done.has(s)) return;
    done.add(s);
    const mates = nodes.map((_, q) => q).filter((q) => shareOf[q] === s);
    const total = mates.reduce((sum, q) => sum + nodes[q].weight, 0);
    for (const q of mates) {
      const scaled = { first: kernels[q].first, weights: kernels[q].weights.map((w) => (w * nodes[q].weight) / total) };
      addSpread(shares[s].perp, scaled, out.perp);
      addSpread(shares[s].par, scaled, out.par);
    }
  });
}
