// A radius quadrature whose nodes sit on one fixed logarithmic lattice shared by every distribution, so that
// single-drop kernels computed for one request serve any other (the kernel cache keys on the node radius).

import type { DropSizeDistribution } from "./distributions.js";
import { numberDensityPerUm } from "./distributions.js";
import { radiusQuadrature, DEFAULT_NODES_PER_DECADE, type RadiusQuadrature, type RadiusQuadratureOptions } from "./quadrature.js";

/** Node i of the lattice with nodesPerDecade nodes per decade: r_i = 10^(i/nodesPerDecade) µm (anchored at 1 µm). */
export function latticeRadiusUm(i: number, nodesPerDecade: number): number {
  return 10 ** (i / nodesPerDecade);
}

/**
 * Same bounds as radiusQuadrature (all but a tail fraction of the cross-section), but each node is a lattice
 * radius r_i standing for its cell [r_(i−½), r_(i+½)] clipped to the bounds; weight = ∫ n(r) dr over the clipped
 * cell (exact for histograms, midpoint in ln r otherwise). Monodisperse drops keep their own radius.
 */
export function latticeRadiusQuadrature(dist: DropSizeDistribution, options: LatticeQuadratureOptions = {}): RadiusQuadrature {
  const fine = fineLatticeQuadrature(dist, options);
  const thinning = options.thinning ?? DEFAULT_THINNING;
  // A single drop size (monodisperse) keeps its own radius, off the lattice.
  return thinning.length && fine.radiiUm.length > 1 ? thinQuadrature(fine, thinning) : fine;
}

export interface ThinningLevel {
  /** Lattice cells whose cross-section is below this share of the largest cell's... */
  belowPeakShare: number;
  /** ...are merged into every stride-th lattice node (odd, so that a node sits at its cells' centre). */
  stride: number;
}

export interface LatticeQuadratureOptions extends RadiusQuadratureOptions {
  thinning?: readonly ThinningLevel[];
}

export const DEFAULT_THINNING: readonly ThinningLevel[] = [
  { belowPeakShare: 1 / 8, stride: 3 },
  { belowPeakShare: 1 / 32, stride: 9 },
];

/**
 * Merges lattice cells that carry little of the cross-section into coarser nodes: cell i of stride s goes to node
 * round(i/s)·s, which carries the merged cells' geometric cross-section (Σ w r², so the bow's brightness is kept).
 */
function thinQuadrature(q: RadiusQuadrature, levels: readonly ThinningLevel[]): RadiusQuadrature {
  const npd = q.nodesPerDecade;
  const cross = Array.from(q.radiiUm, (r, i) => q.weights[i] * r * r);
  const peak = Math.max(...cross);
  const merged = new Map<number, number>();
  const strides = new Map<number, number>();
  q.radiiUm.forEach((r, i) => {
    const index = Math.round(Math.log10(r) * npd);
    let stride = 1;
    for (const level of levels) if (cross[i] < level.belowPeakShare * peak) stride = Math.max(stride, level.stride);
    const node = Math.round(index / stride) * stride;
    merged.set(node, (merged.get(node) ?? 0) + cross[i]);
    strides.set(node, Math.max(strides.get(node) ?? 1, stride));
  });
  const nodes = [...merged.keys()].sort((a, b) => a - b);
  const radiiUm = Float64Array.from(nodes, (i) => latticeRadiusUm(i, npd));
  const weights = Float64Array.from(nodes, (i, k) => merged.get(i)! / (radiiUm[k] * radiiUm[k]));
  // A merged node stands for its stride's cells (the widest stride among those merged into it).
  const cellWidthsLn = Float64Array.from(nodes, (i) => (strides.get(i)! * Math.LN10) / npd);
  return { ...q, radiiUm, weights, cellWidthsLn };
}

function fineLatticeQuadrature(dist: DropSizeDistribution, options: RadiusQuadratureOptions): RadiusQuadrature {
  const base = radiusQuadrature(dist, options);
  if (dist.kind === "monodisperse") return base;
  const npd = options.nodesPerDecade ?? DEFAULT_NODES_PER_DECADE;
  const first = Math.round(Math.log10(base.lowerUm) * npd);
  const last = Math.round(Math.log10(base.upperUm) * npd);
  const radii: number[] = [];
  const weights: number[] = [];
  for (let i = first; i <= last; i++) {
    const lo = Math.max(latticeRadiusUm(i - 0.5, npd), base.lowerUm);
    const hi = Math.min(latticeRadiusUm(i + 0.5, npd), base.upperUm);
    if (!(hi > lo)) continue;
    const w = dist.kind === "histogram" ? histogramMass(dist, lo, hi) : numberDensityPerUm(dist, Math.sqrt(lo * hi)) * (hi - lo);
    if (w > 0) {
      radii.push(latticeRadiusUm(i, npd));
      weights.push(w);
    }
  }
  const cellWidthsLn = new Float64Array(radii.length).fill(Math.LN10 / npd);
  return { ...base, radiiUm: Float64Array.from(radii), weights: Float64Array.from(weights), nodesPerDecade: npd, cellWidthsLn };
}

function histogramMass(dist: Extract<DropSizeDistribution, { kind: "histogram" }>, lo: number, hi: number): number {
  let mass = 0;
  const e = dist.edgesUm;
  for (let b = 0; b < e.length - 1; b++) {
    const overlap = Math.min(hi, e[b + 1]) - Math.max(lo, e[b]);
    if (overlap > 0) mass += (dist.numberPerM3[b] / (e[b + 1] - e[b])) * overlap;
  }
  return mass;
}
