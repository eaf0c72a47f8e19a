// The canting nodes a flattened drop's rows are computed at for one place on the bow. Where the scattering plane
// is a mirror plane of the whole setup (it holds the sunlight's direction by construction, and it holds the
// vertical at the top and the foot of the bow, arc positions 0° and 180°), a drop tilted one way out of the plane
// and its mirror image tilted the other way scatter the same |S1|² and |S2|² into the plane: the mirror leaves the
// incident and scattered directions and the parallel field in place and turns the perpendicular field's sign
// (the mirror symmetry of the laws of reflection and refraction: common practice). Such pairs of nodes of
// cantingNodesFive are traced once, with their weights added: 4 nodes instead of 5 there.

import { cantingNodesFive, type CantingNode } from "../drops/shape/canting.js";
import { bowScatteringPlane, cantedAxis } from "../rays/bow-geometry.js";
import { cross, dot } from "../view/vectors.js";

/** Axes closer than this (unit vectors, componentwise) are one axis: far below any tilt the rules place (≥ 1e-3°). */
const SAME_AXIS = 1e-12;

export interface PlaceOnBow {
  cantingSdDeg: number;
  sunElevationDeg: number;
  arcPositionDeg: number;
}

/** cantingNodesFive(spec.cantingSdDeg) with nodes that are mirror images through the spec's scattering plane merged. */
export function planeCantingNodes(spec: PlaceOnBow): CantingNode[] {
  return mergeMirrorImages(spec).nodes;
}

/** For each node of cantingNodesFive(spec.cantingSdDeg), the index of the planeCantingNodes(spec) node that carries it. */
export function planeCantingNodeOf(spec: PlaceOnBow): number[] {
  return mergeMirrorImages(spec).of;
}

function mergeMirrorImages(spec: PlaceOnBow): { nodes: CantingNode[]; of: number[] } {
  const nodes = cantingNodesFive(spec.cantingSdDeg);
  const { dIn, e } = bowScatteringPlane(spec.sunElevationDeg, spec.arcPositionDeg);
  const normal = cross(dIn, e);
  const axes = nodes.map((node) => cantedAxis(node.tiltXDeg, node.tiltYDeg));
  const kept: CantingNode[] = [];
  const keptAxes: (typeof axes)[number][] = [];
  const of = nodes.map((node, k) => {
    const along = dot(axes[k], normal);
    const mirrored = axes[k].map((c, i) => c - 2 * along * normal[i]);
    const twin = keptAxes.findIndex((axis) => axis.every((c, i) => Math.abs(c - mirrored[i]) < SAME_AXIS));
    // A node in the plane is its own mirror image: it stays one node.
    if (twin >= 0 && Math.abs(along) >= SAME_AXIS) {
      kept[twin] = { ...kept[twin], weight: kept[twin].weight + node.weight };
      return twin;
    }
    keptAxes.push(axes[k]);
    return kept.push({ ...node }) - 1;
  });
  return { nodes: kept, of };
}
