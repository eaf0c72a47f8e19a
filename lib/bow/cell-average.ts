// A Lorenz–Mie kernel row averaged over the radius cell its node stands for. A single drop's |S|² ripples in size
// parameter with a quasi-period below one (see radius-density.ts); the drop-size integral over one cell,
// ∫cell n(r) K(r) dr = ∫cell n(r) r · K(r) d ln r, with n(r)·r taken as constant across the cell (the midpoint rule
// in ln r the lattice quadrature already uses for the weight), is the weight times the mean of K over the cell in
// ln r. That mean does not depend on the distribution, so it is cached like any other row.

export interface CellAverage {
  /** Sizes the mean is taken over, at the midpoints of equal steps in ln r. */
  samples: number;
  /** Width of the cell in ln r, centred on the node's radius. */
  widthLn: number;
}

/** Radius of sub-sample s (0-based) of a cell around radiusUm: midpoints of equal steps in ln r. */
export function cellSampleRadiusUm(radiusUm: number, average: CellAverage, s: number): number {
  return radiusUm * Math.exp(average.widthLn * ((s + 0.5) / average.samples - 0.5));
}

/** The key part that tells an averaged row from a single-size one (cache packs, task buffers). */
export function rowVariant(engine: string, average: CellAverage | undefined): string {
  return average && average.samples > 1 ? `${engine}~${average.samples}x${average.widthLn.toPrecision(12)}` : engine;
}
