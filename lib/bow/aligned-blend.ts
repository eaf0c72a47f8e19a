// Rows of a bow blended across a parameter (the refractive index, the drop's flattening) with their bows aligned
// ("displacement interpolation"): the bow's geometric angle Θ_R moves fast with the parameter while the shape of the
// row around it changes slowly, so each node's row is first shifted so that its fold lands where the blended fold
// belongs, then the shifted rows are blended with the nodes' weights. Blending unshifted rows whose folds sit a bin or
// more apart would draw one bow per node.

import { lagrangeWeights } from "../rays/sweep-interpolation.js";

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
