import { type DropSizeDistribution, numberDensityPerUm, validateDistribution } from "./distributions.js";

/** Largest radius integrated by default: rain drops above ~3 mm radius (6 mm diameter) are rare and break up (NASA GPM, "How big can a raindrop get?": collisions and surface instabilities limit drops to about 6 mm diameter). */
export const DEFAULT_MAX_RADIUS_UM = 3000;
export const DEFAULT_NODES_PER_DECADE = 64;
/** Part of each covered moment left outside the bounds, split equally between the two tails. */
export const DEFAULT_TAIL_FRACTION = 1e-4;

export interface RadiusQuadratureOptions {
  readonly nodesPerDecade?: number;
  readonly tailFraction?: number;
  /** Moments k of ∫ r^k n(r) dr whose mass the bounds must hold; default [2] (geometric cross-section). */
  readonly coverMoments?: readonly number[];
  readonly maxRadiusUm?: number;
}

export interface RadiusQuadrature {
  /** Σ weights[i]·f(radiiUm[i]) ≈ ∫ f(r) n(r) dr; weights in m⁻³. */
  readonly radiiUm: Float64Array;
  readonly weights: Float64Array;
  readonly lowerUm: number;
  readonly upperUm: number;
  readonly nodesPerDecade: number;
  /** True when the bounds were cut at maxRadiusUm. */
  readonly cappedAtMaxRadius: boolean;
  readonly maxRadiusUm: number;
  /** Share of ∫ r² n(r) dr above maxRadiusUm, left out of the quadrature. */
  readonly crossSectionFractionAboveCap: number;
  /** Width in ln r of the radius cell each node stands for (lattice quadratures); absent for a single drop size. */
  readonly cellWidthsLn?: Float64Array;
}

// Dense log grid for locating quantiles of continuous laws: 1 nm to 10 cm radius, 400 points per decade;
// the trapezoid rule in ln r on it is accurate far beyond the 1e-4 tails it is used for.
const SEARCH_LOWER_UM = 1e-3;
const SEARCH_UPPER_UM = 1e5;
const SEARCH_PER_DECADE = 400;

interface Cumulative {
  readonly radiiUm: Float64Array;
  readonly cumulative: Float64Array;
}

/** Running integral of r^k n(r) dr = r^(k+1) n(r) d(ln r) on the dense grid (trapezoid rule). */
function cumulativeMoment(dist: DropSizeDistribution, k: number): Cumulative {
  const decades = Math.log10(SEARCH_UPPER_UM / SEARCH_LOWER_UM);
  const count = Math.round(decades * SEARCH_PER_DECADE) + 1;
  const h = Math.log(SEARCH_UPPER_UM / SEARCH_LOWER_UM) / (count - 1);
  const radiiUm = new Float64Array(count);
  const cumulative = new Float64Array(count);
  let previous = 0;
  for (let i = 0; i < count; i++) {
    const r = SEARCH_LOWER_UM * Math.exp(i * h);
    radiiUm[i] = r;
    const f = r ** (k + 1) * numberDensityPerUm(dist, r);
    if (i > 0) cumulative[i] = cumulative[i - 1] + 0.5 * h * (f + previous);
    previous = f;
  }
  return { radiiUm, cumulative };
}

function quantile(c: Cumulative, fraction: number): number {
  const total = c.cumulative[c.cumulative.length - 1];
  const target = fraction * total;
  let i = 1;
  while (i < c.cumulative.length - 1 && c.cumulative[i] < target) i++;
  const c0 = c.cumulative[i - 1];
  const c1 = c.cumulative[i];
  const t = c1 > c0 ? (target - c0) / (c1 - c0) : 0;
  return c.radiiUm[i - 1] * Math.pow(c.radiiUm[i] / c.radiiUm[i - 1], t);
}

function fractionAbove(c: Cumulative, radiusUm: number): number {
  const total = c.cumulative[c.cumulative.length - 1];
  if (!(total > 0)) return 0;
  const r = c.radiiUm;
  if (radiusUm <= r[0]) return 1;
  if (radiusUm >= r[r.length - 1]) return 0;
  const h = Math.log(r[1] / r[0]);
  const x = Math.log(radiusUm / r[0]) / h;
  const i = Math.floor(x);
  const below = c.cumulative[i] + (x - i) * (c.cumulative[i + 1] - c.cumulative[i]);
  return 1 - below / total;
}

/** Midpoint rule in ln r over [a, b]: nodes r_i, weights n(r_i) r_i Δ(ln r). */
function logMidpointNodes(a: number, b: number, nodesPerDecade: number, density: (r: number) => number, minNodes: number) {
  const m = Math.max(minNodes, Math.ceil(Math.log10(b / a) * nodesPerDecade));
  const h = Math.log(b / a) / m;
  const radii = new Float64Array(m);
  const weights = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const r = a * Math.exp((i + 0.5) * h);
    radii[i] = r;
    weights[i] = density(r) * r * h;
  }
  return { radii, weights };
}

/**
 * Constant density over [a, b] split into log-spaced pieces; each node carries its piece's exact number and sits
 * at the piece's root-mean-square radius, so number and cross-section (r⁰ and r² moments) are integrated exactly.
 */
function histogramBinNodes(a: number, b: number, density: number, nodesPerDecade: number) {
  const m = Math.max(2, Math.ceil(Math.log10(b / a) * nodesPerDecade));
  const radii = new Float64Array(m);
  const weights = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const lo = a * (b / a) ** (i / m);
    const hi = i === m - 1 ? b : a * (b / a) ** ((i + 1) / m);
    weights[i] = density * (hi - lo);
    radii[i] = Math.sqrt((hi * hi + hi * lo + lo * lo) / 3);
  }
  return { radii, weights };
}

function concat(parts: Float64Array[]): Float64Array {
  const out = new Float64Array(parts.reduce((s, p) => s + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}

/**
 * Nodes and weights with ∫ f(r) n(r) dr ≈ Σ w_i f(r_i), log-spaced (midpoint rule in ln r) over the range
 * holding all but tailFraction of each covered moment, cut at maxRadiusUm.
 */
export function radiusQuadrature(dist: DropSizeDistribution, options: RadiusQuadratureOptions = {}): RadiusQuadrature {
  validateDistribution(dist);
  const nodesPerDecade = options.nodesPerDecade ?? DEFAULT_NODES_PER_DECADE;
  const tail = options.tailFraction ?? DEFAULT_TAIL_FRACTION;
  const maxRadiusUm = options.maxRadiusUm ?? DEFAULT_MAX_RADIUS_UM;
  const moments = options.coverMoments ?? [2];
  if (!(nodesPerDecade > 0) || !(tail > 0 && tail < 1) || !(maxRadiusUm > 0) || moments.length === 0) {
    throw new RangeError("invalid quadrature options");
  }

  if (dist.kind === "monodisperse") {
    const capped = dist.radiusUm > maxRadiusUm;
    if (capped) throw new RangeError(`monodisperse radius ${dist.radiusUm} µm exceeds the ${maxRadiusUm} µm cap`);
    return {
      radiiUm: Float64Array.of(dist.radiusUm), weights: Float64Array.of(dist.totalNumberPerM3),
      lowerUm: dist.radiusUm, upperUm: dist.radiusUm, nodesPerDecade, cappedAtMaxRadius: false, maxRadiusUm,
      crossSectionFractionAboveCap: 0,
    };
  }

  if (dist.kind === "histogram") {
    const e = dist.edgesUm;
    const radii: Float64Array[] = [];
    const weights: Float64Array[] = [];
    for (let i = 0; i < e.length - 1; i++) {
      const a = e[i];
      const b = Math.min(e[i + 1], maxRadiusUm);
      if (a >= b || dist.numberPerM3[i] === 0) continue;
      const part = histogramBinNodes(a, b, dist.numberPerM3[i] / (e[i + 1] - e[i]), nodesPerDecade);
      radii.push(part.radii);
      weights.push(part.weights);
    }
    return {
      radiiUm: concat(radii), weights: concat(weights), lowerUm: e[0], upperUm: Math.min(e[e.length - 1], maxRadiusUm),
      nodesPerDecade, cappedAtMaxRadius: e[e.length - 1] > maxRadiusUm, maxRadiusUm,
      crossSectionFractionAboveCap: fractionOfCrossSectionAbove(dist, maxRadiusUm),
    };
  }

  let lowerUm = Infinity;
  let upperUm = 0;
  for (const k of moments) {
    const c = cumulativeMoment(dist, k);
    lowerUm = Math.min(lowerUm, quantile(c, tail / 2));
    upperUm = Math.max(upperUm, quantile(c, 1 - tail / 2));
  }
  const cappedAtMaxRadius = upperUm > maxRadiusUm;
  if (cappedAtMaxRadius) upperUm = maxRadiusUm;
  if (!(lowerUm < upperUm)) throw new RangeError(`distribution lies above the ${maxRadiusUm} µm cap`);
  const { radii, weights } = logMidpointNodes(lowerUm, upperUm, nodesPerDecade, (r) => numberDensityPerUm(dist, r), 1);
  return {
    radiiUm: radii, weights, lowerUm, upperUm, nodesPerDecade, cappedAtMaxRadius, maxRadiusUm,
    crossSectionFractionAboveCap: fractionOfCrossSectionAbove(dist, maxRadiusUm),
  };
}

/**
 * Share of the geometric cross-section ∫ r² n(r) dr carried by drops larger than radiusUm; drops above about
 * 1 mm radius are flattened (Beard & Chuang 1987, J. Atmos. Sci. 44, 1509) and the sphere model overstates them.
 */
export function fractionOfCrossSectionAbove(dist: DropSizeDistribution, radiusUm: number): number {
  validateDistribution(dist);
  if (dist.kind === "monodisperse") return dist.radiusUm > radiusUm ? 1 : 0;
  if (dist.kind === "histogram") {
    const e = dist.edgesUm;
    let above = 0;
    let total = 0;
    for (let i = 0; i < e.length - 1; i++) {
      const density = dist.numberPerM3[i] / (e[i + 1] - e[i]);
      const cube = (a: number, b: number) => (density * (b ** 3 - a ** 3)) / 3;
      total += cube(e[i], e[i + 1]);
      if (e[i + 1] > radiusUm) above += cube(Math.max(e[i], radiusUm), e[i + 1]);
    }
    return total > 0 ? above / total : 0;
  }
  return fractionAbove(cumulativeMoment(dist, 2), radiusUm);
}
