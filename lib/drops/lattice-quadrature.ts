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
export function latticeRadiusQuadrature(dist: DropSizeDistribution, options: RadiusQuadratureOptions = {}): RadiusQuadrature {
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
  return { ...base, radiiUm: Float64Array.from(radii), weights: Float64Array.from(weights), nodesPerDecade: npd };
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
