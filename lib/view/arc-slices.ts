// A bow that changes along its arc (flattened drops): profiles at a few arc positions (nodes), blended per pixel
// between the two nodes about its arc position. Between nodes the bows move (the top of a flattened drop's
// primary lies up to several degrees from its side), and a plain blend of two profiles whose peaks lie apart draws
// two faint bows instead of one moving bow. So the blend keeps the bows aligned: ψ is warped piecewise linearly
// so that each node's primary and secondary peaks land where the pixel's own peaks lie, at positions interpolated
// linearly in arc position (displacement interpolation, our choice; its error is measured by
// bench/arc-interpolation.ts and stated in pipeline/compute/arc-nodes.ts).

import type { ProfileColours } from "./layer.js";

/**
 * Peaks of two neighbouring nodes further apart than this are taken for different features (a peak search that
 * found another maximum at one of them), and are not aligned. The bow of 2 mm drops moves by at most 0.22° per
 * degree of arc (lib/bow/shaped-rows.ts), 1.1° between nodes 5° apart.
 */
export const MAX_ALIGNED_SHIFT_DEG = 3;

export interface ArcSlices {
  /** Arc positions of the nodes, ascending, degrees (0 = the bow's top, 180 = its lowest point). */
  nodesDeg: Float64Array;
  /** The colours of each node's profile, all on the same ψ grid. */
  slices: ProfileColours[];
  /** Per node: ψ of the primary's and the secondary's luminance peaks, or null where there is none. */
  bows: { primaryDeg: number | null; secondaryDeg: number | null }[];
}

/** The two nodes that make a pixel's colour, their weights, and the ψ at which each is sampled. */
export interface ArcSample {
  k0: number;
  k1: number;
  w0: number;
  w1: number;
  psi0Deg: number;
  psi1Deg: number;
}

export class ArcBlender {
  private readonly fromDeg: number;
  private readonly toDeg: number;
  private readonly knots0 = new Float64Array(4);
  private readonly knots1 = new Float64Array(4);
  private readonly target = new Float64Array(4);
  readonly sample: ArcSample = { k0: 0, k1: 0, w0: 1, w1: 0, psi0Deg: 0, psi1Deg: 0 };

  constructor(readonly arc: ArcSlices) {
    const grid = arc.slices[0];
    this.fromDeg = grid.fromDeg;
    this.toDeg = grid.fromDeg + (grid.count - 1) * grid.stepDeg;
  }

  /** Fills `sample` for a pixel at arc position alphaDeg and angle psiDeg (inside the slices' ψ grid). */
  at(alphaDeg: number, psiDeg: number): ArcSample {
    const nodes = this.arc.nodesDeg;
    const s = this.sample;
    const last = nodes.length - 1;
    let k = 0;
    while (k < last - 1 && alphaDeg > nodes[k + 1]) k++;
    const span = last > 0 ? nodes[k + 1] - nodes[k] : 0;
    const t = span > 0 ? Math.min(Math.max((alphaDeg - nodes[k]) / span, 0), 1) : 0;
    s.k0 = k;
    s.k1 = Math.min(k + 1, last);
    s.w0 = 1 - t;
    s.w1 = t;
    const count = this.knots(this.arc.bows[s.k0], this.arc.bows[s.k1]);
    for (let j = 0; j < count; j++) this.target[j] = s.w0 * this.knots0[j] + s.w1 * this.knots1[j];
    let j = 0;
    while (j < count - 2 && psiDeg > this.target[j + 1]) j++;
    const width = this.target[j + 1] - this.target[j];
    const f = width > 0 ? (psiDeg - this.target[j]) / width : 0;
    s.psi0Deg = this.knots0[j] + f * (this.knots0[j + 1] - this.knots0[j]);
    s.psi1Deg = this.knots1[j] + f * (this.knots1[j + 1] - this.knots1[j]);
    return s;
  }

  /** Knots of the two nodes: the grid's ends and each bow peak both nodes have, in ascending order in both. */
  private knots(b0: ArcSlices["bows"][number], b1: ArcSlices["bows"][number]): number {
    let n = 0;
    this.knots0[n] = this.fromDeg;
    this.knots1[n++] = this.fromDeg;
    for (const key of ["primaryDeg", "secondaryDeg"] as const) {
      const p0 = b0[key];
      const p1 = b1[key];
      if (p0 === null || p1 === null || Math.abs(p0 - p1) > MAX_ALIGNED_SHIFT_DEG || !(p0 > this.knots0[n - 1] && p1 > this.knots1[n - 1] && p0 < this.toDeg && p1 < this.toDeg)) continue;
      this.knots0[n] = p0;
      this.knots1[n++] = p1;
    }
    this.knots0[n] = this.toDeg;
    this.knots1[n++] = this.toDeg;
    return n;
  }
}
