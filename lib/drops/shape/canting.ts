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
