// The canting nodes a flattened drop's rows are computed at for one place on the bow. Where the scattering plane
// is a mirror plane of the whole setup (it holds the sunlight's direction by construction, and it holds the
// vertical at the top and the foot of the bow, arc positions 0° and 180°), a drop tilted one way out of the plane
// and its mirror image tilted the other way scatter the same |S1|² and |S2|² into the plane: the mirror leaves the
// incident and scattered directions and the parallel field in place and turns the perpendicular field's sign
// (the mirror symmetry of the laws of reflection and refraction: common practice). Such pairs of nodes of the
// place's rule are traced once, with their weights added: there 4 nodes of the five-node rule's 5, 15 of the banded
// rule's 30 (placeCantingRule).

import { cantingNodesBanded, cantingNodesFive, type BandedCantingRule, type CantingNode } from "../drops/shape/canting.js";
import { bowScatteringPlane, cantedAxis } from "../rays/bow-geometry.js";
import { cross, dot } from "../view/vectors.js";

/** Axes closer than this (unit vectors, componentwise) are one axis: far below any tilt the rules place (≥ 1e-3°). */
const SAME_AXIS = 1e-12;

export interface PlaceOnBow {
  cantingSdDeg: number;
  sunElevationDeg: number;
  arcPositionDeg: number;
  /** ShapedRowSpec.cantingBand: whether the banded rule is taken near a mirror plane. */
  cantingBand?: boolean;
}

/**
 * The banded rule is used where the tilt across the sun's vertical plane that puts a drop's axis in the scattering
 * plane's mirror plane lies within this many σ (mirrorTiltDeg): beyond, the band's mass is below 0.012 (measured rows of
 * 2 mm drops ×5 inside the band: ≤ 6 % of the light, left to the five-node rule).
 */
export const BANDED_REACH_SD = 2.5;

const DEG = Math.PI / 180;

/**
 * The tilt across the sun's vertical plane (cantedAxis's tiltY) that turns an upright drop's axis into the vertical
 * plane through the sunlight at arc position A's nearest mirror: a drop turned by δ about the sunlight scatters into
 * the plane at A what the upright drop sends to A − δ (rotation invariance), so the drops whose own frame sees the
 * plane as its top or foot (their mirror plane) are those turned by δ = A or A − 180°. Turning ẑ by δ about
 * d_in = (cos h, 0, −sin h) gives a = (sin h cos h (cos δ − 1), cos h sin δ, sin²h + cos²h cos δ), h the sun's
 * elevation: tilted across by atan(a_y / a_z), and in the sun's plane by less than 0.4° for |δ| ≤ 20° (vector
 * algebra: common practice), which the rule's cells there (13° wide) leave alone.
 */
export function mirrorTiltDeg(spec: Omit<PlaceOnBow, "cantingSdDeg">): number {
  const d = (spec.arcPositionDeg - 180 * Math.round(spec.arcPositionDeg / 180)) * DEG;
  const h = spec.sunElevationDeg * DEG;
  return Math.atan2(Math.cos(h) * Math.sin(d), Math.sin(h) ** 2 + Math.cos(h) ** 2 * Math.cos(d)) / DEG;
}

/**
 * The canting rule of one place on the bow: the five-node rule (cantingNodesFive), or, where spec.cantingBand asks for
 * it (large drops: shaped-rows.ts BANDED_FROM_RADIUS_UM), near a mirror plane the banded rule (cantingNodesBanded) centred on mirrorTiltDeg, whose 1°-wide cells of tilt across the plane weigh a band of
 * drops with their axis near the plane by the band's own mass (2 mm drops at the top of the bow: rows 5–7× their
 * neighbours' over tilts within 1.9° of the plane, which the five-node rule weighed 2/3 through its three nodes there).
 */
export function placeCantingRule(spec: PlaceOnBow): { nodes: CantingNode[]; banded: BandedCantingRule | null } {
  if (spec.cantingSdDeg > 0 && spec.cantingBand === true) {
    const centre = mirrorTiltDeg(spec);
    if (Math.abs(centre) <= BANDED_REACH_SD * spec.cantingSdDeg) {
      const banded = cantingNodesBanded(spec.cantingSdDeg, centre);
      return { nodes: banded.nodes, banded };
    }
  }
  return { nodes: cantingNodesFive(spec.cantingSdDeg), banded: null };
}

/** placeCantingRule(spec)'s nodes with nodes that are mirror images through the spec's scattering plane merged. */
export function planeCantingNodes(spec: PlaceOnBow): CantingNode[] {
  return planeCantingRule(spec).nodes;
}

/** The place's rule (placeCantingRule), its nodes with mirror images merged (nodes) and, for each rule node, the merged node that carries it (of). */
export function planeCantingRule(spec: PlaceOnBow): { rule: ReturnType<typeof placeCantingRule>; nodes: CantingNode[]; of: number[] } {
  const rule = placeCantingRule(spec);
  return { rule, ...mergeMirrorImages(spec, rule.nodes) };
}

function mergeMirrorImages(spec: PlaceOnBow, nodes: readonly CantingNode[]): { nodes: CantingNode[]; of: number[] } {
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
