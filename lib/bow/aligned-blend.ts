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

/** Scratch arrays for addShiftedContext, reused across calls of one length. */
export interface ShiftScratch {
  rays: { perp: Float64Array; par: Float64Array };
  bow: { perp: Float64Array; par: Float64Array };
  table: UniformBowTable;
}

export function shiftScratch(paddedCount: number, count: number): ShiftScratch {
  const bins = () => new Float64Array(paddedCount);
  const out = () => new Float64Array(count);
  return {
    rays: { perp: bins(), par: bins() },
    bow: { perp: bins(), par: bins() },
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
  };
}

/** values[at] by linear interpolation between whole indices (at within the array). */
function lerp(values: Float64Array, at: number): number {
  const i = Math.floor(at);
  const t = at - i;
  return t === 0 ? values[i] : (1 - t) * values[i] + t * values[i + 1];
}

/**
 * Adds weight × the context's row at size parameter x, shifted by shiftDeg (as addShiftedRow), to perp/par: its ray
 * optics (x²·raysPerX2) by linear interpolation of the bin means; its bows, where both bins the shift reads are served
 * by the uniform formula, evaluated exactly on the shifted table: the table's ẑ at the bin edges and its u, v are
 * smooth through the fold (ẑ ∝ Θ − Θ_R there, lib/bow/plane-bow-table.ts) and are interpolated at the shifted angles,
 * and addUniformBowBins integrates Ai², Ai′² across each output bin (so a bow's peak narrower than a bin keeps its bin
 * means, which interpolating them would spread over two bins); elsewhere the bow's bin means are interpolated too.
 * The context is on a grid padded by `pad` bins a side (paddedGrid); perp/par hold the unpadded grid's bins.
 */
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
  const { rays, bow, table } = scratch;
  const x2 = x * x;
  for (let j = 0; j < rays.perp.length; j++) {
    rays.perp[j] = x2 * ctx.raysPerX2.perpendicular[j];
    rays.par[j] = x2 * ctx.raysPerX2.parallel[j];
  }
  addShiftedRow(rays.perp, pad, shiftDeg, stepDeg, weight, perp);
  addShiftedRow(rays.par, pad, shiftDeg, stepDeg, weight, par);
  const shiftBins = shiftDeg / stepDeg;
  const last = rays.perp.length - 1;
  for (const source of ctx.bowTables) {
    let mixed = false;
    for (let j = 0; j < perp.length; j++) {
      const at = Math.min(Math.max(j + pad - shiftBins, 0), last);
      const i = Math.floor(at);
      const both = source.uniform[i] === 1 && (at === i || source.uniform[i + 1] === 1);
      table.uniform[j] = both ? 1 : 0;
      if (both) {
        table.uPerp[j] = lerp(source.uPerp, at);
        table.uPar[j] = lerp(source.uPar, at);
        table.vPerp[j] = lerp(source.vPerp, at);
        table.vPar[j] = lerp(source.vPar, at);
        table.zHatEdges[j] = lerp(source.zHatEdges, at);
        table.zHatEdges[j + 1] = lerp(source.zHatEdges, at + 1);
      } else if (source.uniform[i] === 1 || (at !== i && source.uniform[i + 1] === 1)) mixed = true;
    }
    addUniformBowBins(table, x, weight, perp, par);
    // Bins that read one uniform bin and one that is not take the bow's bin means, interpolated; elsewhere they are 0.
    if (!mixed) continue;
    bow.perp.fill(0);
    bow.par.fill(0);
    addUniformBowBins(source, x, 1, bow.perp, bow.par);
    for (let j = 0; j < perp.length; j++) {
      if (table.uniform[j]) continue;
      const at = Math.min(Math.max(j + pad - shiftBins, 0), last);
      perp[j] += weight * lerp(bow.perp, at);
      par[j] += weight * lerp(bow.par, at);
    }
  }
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
  const scratch = shiftScratch(count + 2 * pad, count);
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
    const rebuilt = rowOf((perp, par) => others.forEach((i, k) => addShiftedContext(ctxs[i], x, pad, foldsDeg[q] - foldsDeg[i], stepDeg, weights[k], perp, par, scratch)));
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
