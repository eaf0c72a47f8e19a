// Rows of a bow blended across a parameter (the refractive index, the drop's flattening) with their bows aligned
// ("displacement interpolation"): the bow's geometric angle Θ_R moves fast with the parameter while the shape of the
// row around it changes slowly, so each node's row is first shifted so that its fold lands where the blended fold
// belongs, then the shifted rows are blended with the nodes' weights. Blending unshifted rows whose folds sit a bin or
// more apart would draw one bow per node.

import { lagrangeWeights } from "../rays/sweep-interpolation.js";
import { addUniformBowBins, type UniformBowTable } from "./airy-bins.js";
import type { ShapedPlaneContext } from "./shaped-plane-rows.js";

/**
 * The uniform grid of `count` bins of width stepDeg starting at firstDeg, widened by `pad` bins on each side: rows
 * computed there can be shifted by up to pad bins without reading past their ends.
 */
export function paddedGrid(thetaDeg: Float64Array, stepDeg: number, pad: number): Float64Array {
  return Float64Array.from({ length: thetaDeg.length + 2 * pad }, (_, j) => thetaDeg[0] + (j - pad) * stepDeg);
}

/** Bins of padding that cover a shift of shiftDeg on a grid of stepDeg, with one bin to spare for the interpolation. */
export function padFor(shiftDeg: number, stepDeg: number): number {
  return Math.ceil(Math.abs(shiftDeg) / stepDeg) + 1;
}

/**
 * Adds weight × src shifted by shiftDeg (src's feature at Θ lands at Θ + shiftDeg) to out, by linear interpolation
 * between src's bin means: src holds out.length + 2·pad bins, the first `pad` of them before out's first (paddedGrid).
 * Linear interpolation of bin means spreads a feature by less than one bin; reading past src's ends takes its end
 * values (the caller pads by padFor of the largest shift, so that does not happen).
 */
export function addShiftedRow(src: Float64Array, pad: number, shiftDeg: number, stepDeg: number, weight: number, out: Float64Array): void {
  const shiftBins = shiftDeg / stepDeg;
  const last = src.length - 1;
  for (let j = 0; j < out.length; j++) {
    const at = j + pad - shiftBins;
    if (at <= 0) out[j] += weight * src[0];
    else if (at >= last) out[j] += weight * src[last];
    else {
      const i = Math.floor(at);
      const t = at - i;
      out[j] += weight * ((1 - t) * src[i] + t * src[i + 1]);
    }
  }
}

/**
 * How well values at the nodes follow one polynomial: each interior node's value predicted by Lagrange's formula over
 * the other nodes (Press et al. 2007 Eq. 3.2.1), the worst miss relative to the largest |value|. A smooth quantity
 * misses by about the interpolation error of one degree less; one with a pole or a jump between the nodes (a bow's
 * constants where its fold meets another caustic) misses by its own size.
 */
export function leaveOneOutMiss(nodes: readonly number[], values: readonly number[]): number {
  const scale = Math.max(...values.map(Math.abs));
  if (!(scale > 0)) return 0;
  let worst = 0;
  for (let q = 1; q + 1 < nodes.length; q++) {
    const others = nodes.filter((_, i) => i !== q);
    const weights = lagrangeWeights(others, nodes[q]);
    const predicted = values.filter((_, i) => i !== q).reduce((sum, v, i) => sum + weights[i] * v, 0);
    worst = Math.max(worst, Math.abs(predicted - values[q]) / scale);
  }
  return worst;
}

/** Scratch of addBlendedContexts: the blended table on the output grid, reused across calls of one length. */
export interface ShiftScratch {
  table: UniformBowTable;
  /** Per output bin: whether some source's table touches it without every source's serving it. */
  mixed: Uint8Array;
}

export function shiftScratch(count: number): ShiftScratch {
  const out = () => new Float64Array(count);
  return {
    table: {
      zHatEdges: new Float64Array(count + 1),
      uPerp: out(),
      uPar: out(),
      vPerp: out(),
      vPar: out(),
      otherPerp: out(),
      otherPar: out(),
      uniform: new Uint8Array(count),
    },
    mixed: new Uint8Array(count),
  };
}

/** values[at] by linear interpolation between whole indices (at within the array). */
function lerp(values: Float64Array, at: number): number {
  const i = Math.floor(at);
  const t = at - i;
  return t === 0 ? values[i] : (1 - t) * values[i] + t * values[i + 1];
}

/**
 * One context of a blend: its weight, the shift (degrees) that lands its fold where the blend's belongs, and the bins
 * its grid is padded by on each side (paddedGrid).
 */
export interface ShiftedContext {
  ctx: ShapedPlaneContext;
  shiftDeg: number;
  weight: number;
  pad: number;
}

/**
 * Adds the blend Σ weight × (each context's row at size parameter x, shifted by its shiftDeg) to perp/par, which hold
 * the unpadded grid's bins. Ray optics (x²·raysPerX2) is blended as bin means, each shifted by linear interpolation
 * (addShiftedRow). The bows are blended before they are squared: each context's uniform table (ẑ at the bin edges, u,
 * v) is smooth through the fold (ẑ ∝ Θ − Θ_R there, lib/bow/plane-bow-table.ts), so it is read at the shifted angles
 * and the tables are blended into one table (ẑ as the weighted mean, u and v with the weights), whose Ai², Ai′²
 * addUniformBowBins integrates across each output bin. Blending ẑ, the phase, moves the supernumeraries with the fold's
 * own spacing at the blended parameter, where blending the squared rows would add each context's fringes where they
 * lie; and a bow's peak narrower than a bin keeps its bin means, which interpolating them would spread over two bins.
 * Bins that read a bin a context's table does not serve take the bows' bin means, shifted and blended. Contexts whose
 * tables differ in number are blended as rows.
 */
export function addBlendedContexts(
  sources: readonly ShiftedContext[],
  x: number,
  stepDeg: number,
  perp: Float64Array,
  par: Float64Array,
  scratch: ShiftScratch,
): void {
  const x2 = x * x;
  for (const { ctx, shiftDeg, weight, pad } of sources) {
    addShiftedRow(ctx.raysPerX2.perpendicular, pad, shiftDeg, stepDeg, weight * x2, perp);
    addShiftedRow(ctx.raysPerX2.parallel, pad, shiftDeg, stepDeg, weight * x2, par);
  }
  const tableCount = sources[0]?.ctx.bowTables.length ?? 0;
  if (sources.some((source) => source.ctx.bowTables.length !== tableCount)) {
    for (const source of sources) addBowTables([source], x, stepDeg, perp, par, scratch);
    return;
  }
  addBowTables(sources, x, stepDeg, perp, par, scratch);
}

/** The bows of addBlendedContexts (its sources' tables, equal in number), blended in scratch.table. */
function addBowTables(sources: readonly ShiftedContext[], x: number, stepDeg: number, perp: Float64Array, par: Float64Array, scratch: ShiftScratch): void {
  const { table, mixed } = scratch;
  // ẑ is blended as a mean (weights normalised to sum 1); u and v, which scale the intensity, with the weights as they are.
  const weightSum = sources.reduce((sum, source) => sum + source.weight, 0);
  const readAt = (j: number, source: ShiftedContext) => Math.min(Math.max(j + source.pad - source.shiftDeg / stepDeg, 0), source.ctx.raysPerX2.perpendicular.length - 1);
  const tableCount = sources[0]?.ctx.bowTables.length ?? 0;
  for (let t = 0; t < tableCount; t++) {
    mixed.fill(0);
    let anyMixed = false;
    for (let j = 0; j < perp.length; j++) {
      let served = 0;
      let touched = 0;
      for (const source of sources) {
        const bow = source.ctx.bowTables[t];
        const at = readAt(j, source);
        const i = Math.floor(at);
        if (bow.uniform[i] === 1 && (at === i || bow.uniform[i + 1] === 1)) served++;
        else if (bow.uniform[i] === 1 || (at !== i && bow.uniform[i + 1] === 1)) touched++;
      }
      table.uniform[j] = served === sources.length ? 1 : 0;
      if (served > 0 && served < sources.length) touched++;
      if (touched > 0) {
        mixed[j] = 1;
        anyMixed = true;
      }
      if (!table.uniform[j]) continue;
      let uPerp = 0;
      let uPar = 0;
      let vPerp = 0;
      let vPar = 0;
      let zLo = 0;
      let zHi = 0;
      for (const source of sources) {
        const bow = source.ctx.bowTables[t];
        const at = readAt(j, source);
        const w = source.weight;
        uPerp += w * lerp(bow.uPerp, at);
        uPar += w * lerp(bow.uPar, at);
        vPerp += w * lerp(bow.vPerp, at);
        vPar += w * lerp(bow.vPar, at);
        zLo += w * lerp(bow.zHatEdges, at);
        zHi += w * lerp(bow.zHatEdges, at + 1);
      }
      table.uPerp[j] = uPerp;
      table.uPar[j] = uPar;
      table.vPerp[j] = vPerp;
      table.vPar[j] = vPar;
      table.zHatEdges[j] = zLo / weightSum;
      table.zHatEdges[j + 1] = zHi / weightSum;
    }
    addUniformBowBins(table, x, 1, perp, par);
    if (!anyMixed) continue;
    // Bins the blended table does not serve but some context's does: each context's bow, as bin means, shifted.
    for (const source of sources) {
      const count = source.ctx.raysPerX2.perpendicular.length;
      const bow = { perp: new Float64Array(count), par: new Float64Array(count) };
      addUniformBowBins(source.ctx.bowTables[t], x, 1, bow.perp, bow.par);
      for (let j = 0; j < perp.length; j++) {
        if (!mixed[j] || table.uniform[j]) continue;
        const at = readAt(j, source);
        perp[j] += source.weight * lerp(bow.perp, at);
        par[j] += source.weight * lerp(bow.par, at);
      }
    }
  }
}

/** Adds weight × one context's row at size parameter x, shifted by shiftDeg (addBlendedContexts of that one context). */
export function addShiftedContext(
  ctx: ShapedPlaneContext,
  x: number,
  pad: number,
  shiftDeg: number,
  stepDeg: number,
  weight: number,
  perp: Float64Array,
  par: Float64Array,
  scratch: ShiftScratch,
): void {
  addBlendedContexts([{ ctx, shiftDeg, weight, pad }], x, stepDeg, perp, par, scratch);
}

/**
 * How well the aligned blend reproduces rows it was not given: each interior node's row at size parameter x rebuilt
 * from the other nodes' rows (each shifted from its fold to the left-out node's, blended with Lagrange weights in the
 * nodes' parameter) and compared with the node's own, both averaged over `smoothBins` bins (the scale at which a row's
 * errors reach a colour); the worst miss relative to the row's averaged peak. Catches what a single shift does not
 * follow: a second caustic of the order moving on its own, amplitudes that jump between the nodes.
 */
export function leaveOneOutRowMiss(
  nodes: readonly number[],
  ctxs: readonly ShapedPlaneContext[],
  foldsDeg: Float64Array,
  x: number,
  pad: number,
  stepDeg: number,
  count: number,
  smoothBins: number,
): number {
  const scratch = shiftScratch(count);
  const rowOf = (build: (perp: Float64Array, par: Float64Array) => void) => {
    const perp = new Float64Array(count);
    const par = new Float64Array(count);
    build(perp, par);
    return boxMean(Float64Array.from(perp, (v, j) => v + par[j]), smoothBins);
  };
  let worst = 0;
  for (let q = 1; q + 1 < nodes.length; q++) {
    const own = rowOf((perp, par) => addShiftedContext(ctxs[q], x, pad, 0, stepDeg, 1, perp, par, scratch));
    const others = nodes.map((_, i) => i).filter((i) => i !== q);
    const weights = lagrangeWeights(others.map((i) => nodes[i]), nodes[q]);
    const sources = others.map((i, k) => ({ ctx: ctxs[i], shiftDeg: foldsDeg[q] - foldsDeg[i], weight: weights[k], pad }));
    const rebuilt = rowOf((perp, par) => addBlendedContexts(sources, x, stepDeg, perp, par, scratch));
    const peak = Math.max(...own);
    if (peak > 0) worst = Math.max(worst, Math.max(...own.map((v, j) => Math.abs(v - rebuilt[j]))) / peak);
  }
  return worst;
}

/** Means over 2·half + 1 bins (fewer at the ends). */
function boxMean(values: Float64Array, half: number): Float64Array {
  return values.map((_, j) => {
    let sum = 0;
    let n = 0;
    for (let i = Math.max(0, j - half); i <= Math.min(values.length - 1, j + half); i++, n++) sum += values[i];
    return sum / n;
  });
}
