// Canting: the tilt of a falling drop's symmetry axis from the vertical.

/**
 * Standard deviation of the canting angle, degrees: 7–8° measured for drops above 2 mm falling 80 m in calm air
 * (Huang, Bringi & Thurai 2008, J. Atmos. Oceanic Technol. 25, 1717–1723, 2D video disdrometer); the middle.
 */
export const CANTING_SD_DEG = 7.5;

export interface CantingNode {
  tiltXDeg: number;
  tiltYDeg: number;
  weight: number;
}

/**
 * Nodes for averaging over a Gaussian spread of tilts, σ in each of two perpendicular vertical planes (the two
 * camera planes of Huang et al. 2008): the 3-point Gauss–Hermite rule in each (nodes 0, ±√3σ, weights 2/3, 1/6:
 * Abramowitz & Stegun 1964 Table 25.10 for the normal density), 9 nodes, exact for polynomials of degree 5.
 */
export function cantingNodes(sdDeg: number): CantingNode[] {
  if (sdDeg === 0) return [{ tiltXDeg: 0, tiltYDeg: 0, weight: 1 }];
  const points = [
    { at: -Math.sqrt(3) * sdDeg, weight: 1 / 6 },
    { at: 0, weight: 2 / 3 },
    { at: Math.sqrt(3) * sdDeg, weight: 1 / 6 },
  ];
  return points.flatMap((a) => points.map((b) => ({ tiltXDeg: a.at, tiltYDeg: b.at, weight: a.weight * b.weight })));
}

/**
 * A cheaper rule for the same spread: the centre (weight 1/3) and ±√3σ on each of the two planes' axes (1/6
 * each), exact for the moments of degree ≤ 3 and for ⟨x⁴⟩ = 3σ⁴ (a symmetric 5-point rule for the bivariate
 * normal, Stroud 1971 §8.9, from memory); used where each node costs a full ray trace.
 */
export function cantingNodesFive(sdDeg: number): CantingNode[] {
  if (sdDeg === 0) return [{ tiltXDeg: 0, tiltYDeg: 0, weight: 1 }];
  const a = Math.sqrt(3) * sdDeg;
  return [
    { tiltXDeg: 0, tiltYDeg: 0, weight: 1 / 3 },
    { tiltXDeg: a, tiltYDeg: 0, weight: 1 / 6 },
    { tiltXDeg: -a, tiltYDeg: 0, weight: 1 / 6 },
    { tiltXDeg: 0, tiltYDeg: a, weight: 1 / 6 },
    { tiltXDeg: 0, tiltYDeg: -a, weight: 1 / 6 },
  ];
}

/** One tilt of a one-dimensional rule: a node, its weight (the cell's mass under the normal density) and its cell. */
export interface TiltCell1D {
  atDeg: number;
  weight: number;
  loDeg: number;
  hiDeg: number;
}

/**
 * The product rule used near a plane of mirror symmetry (lib/bow/plane-canting-nodes.ts): nodes[i·ty.length + j] is
 * (tx[i], ty[j]) with weight tx[i].weight·ty[j].weight.
 */
export interface BandedCantingRule {
  tx: TiltCell1D[];
  ty: TiltCell1D[];
  nodes: CantingNode[];
}

/**
 * The 3-point Gauss–Hermite rule for the normal density, nodes in σ and weights (Abramowitz & Stegun 1964 Table 25.10).
 * Measured against brute force over the pupil (bench/canting-spread.ts, 2 mm drops at the top of the bow): the 5-point
 * rule in its place took the banded mean's error from 0.596 to 0.484 of the peak (summed 0.251 to 0.200) for 5/3 of the
 * planes; 1 mm drops 0.154 to 0.135.
 */
const GAUSS_HERMITE_3: [number, number][] = [[-Math.sqrt(3), 1 / 6], [0, 2 / 3], [Math.sqrt(3), 1 / 6]];

/** Cells 1° wide within this of the band's centre: a bright band of tilts there is 3.4–3.8° wide for 2 mm drops (issue 13's notes). */
export const BAND_HALF_WIDTH_DEG = 3;
/** The fine cells' width, degrees. */
const BAND_CELL_DEG = 1;
/** Beyond the band, cells this many σ wide out to OUTER_REACH_SD from the spread's centre, then one cell to ±∞. */
const OUTER_CELL_SD = 0.7;
const OUTER_REACH_SD = 1.8;

/**
 * A rule for the spread of tilts near a plane of mirror symmetry: the tilt in the sun's vertical plane (tx) by the
 * 3-point Gauss–Hermite rule (nodes 0, ±√3σ, weights 2/3 and 1/6: Abramowitz & Stegun 1964 Table 25.10; its cells
 * those of the nearest node), the tilt across it (ty) by cells: BAND_CELL_DEG wide within BAND_HALF_WIDTH_DEG of
 * bandCentreDeg, wider beyond, each node at its cell's centroid under the normal density and weighted by its mass
 * (a composite midpoint rule: common practice), so that a band of tilts whose rows differ from their neighbours'
 * (drops whose axis lies near the plane) is weighted by its own mass rather than by a Gauss node's.
 */
export function cantingNodesBanded(sdDeg: number, bandCentreDeg: number): BandedCantingRule {
  const rule = GAUSS_HERMITE_3;
  const tx: TiltCell1D[] = rule.map(([at, weight], k) => ({
    atDeg: at * sdDeg,
    weight,
    loDeg: k === 0 ? -Infinity : ((rule[k - 1][0] + at) / 2) * sdDeg,
    hiDeg: k === rule.length - 1 ? Infinity : ((rule[k + 1][0] + at) / 2) * sdDeg,
  }));
  const fine = Math.round((2 * BAND_HALF_WIDTH_DEG) / BAND_CELL_DEG);
  const outward = (from: number, sign: 1 | -1) => {
    const out: number[] = [];
    for (let edge = from + sign * OUTER_CELL_SD * sdDeg; sign * edge < OUTER_REACH_SD * sdDeg; edge += sign * OUTER_CELL_SD * sdDeg) out.push(edge);
    return out;
  };
  const [low, high] = [bandCentreDeg - BAND_HALF_WIDTH_DEG, bandCentreDeg + BAND_HALF_WIDTH_DEG];
  const edges = [
    -Infinity,
    ...outward(low, -1).reverse(),
    ...Array.from({ length: fine + 1 }, (_, k) => low + k * BAND_CELL_DEG),
    ...outward(high, 1),
    Infinity,
  ];
  const ty = edges.slice(0, -1).map((lo, k) => normalCell(sdDeg, lo, edges[k + 1]));
  const nodes = tx.flatMap((x) => ty.map((y) => ({ tiltXDeg: x.atDeg, tiltYDeg: y.atDeg, weight: x.weight * y.weight })));
  return { tx, ty, nodes };
}

/** Steps of Simpson's rule per cell: the normal density's mass and first moment to 1e-11 over cells up to 10σ wide (common practice). */
const CELL_STEPS = 2000;

/** The cell [lo, hi] of the normal density N(0, σ²): its mass and its centroid (Simpson's rule, ±∞ taken as ±10σ). */
function normalCell(sdDeg: number, loDeg: number, hiDeg: number): TiltCell1D {
  const lo = Math.max(loDeg, -10 * sdDeg);
  const hi = Math.min(hiDeg, 10 * sdDeg);
  const h = (hi - lo) / CELL_STEPS;
  let mass = 0;
  let moment = 0;
  for (let k = 0; k <= CELL_STEPS; k++) {
    const t = lo + k * h;
    const w = (k === 0 || k === CELL_STEPS ? 1 : k % 2 === 1 ? 4 : 2) * (h / 3) * Math.exp(-(t * t) / (2 * sdDeg * sdDeg)) / (sdDeg * Math.sqrt(2 * Math.PI));
    mass += w;
    moment += w * t;
  }
  return { atDeg: mass > 0 ? moment / mass : (lo + hi) / 2, weight: mass, loDeg, hiDeg };
}
