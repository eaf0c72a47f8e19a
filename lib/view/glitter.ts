// Rough water: the sun's reflection off a wind-ruffled sea is spread over many directions (the glitter). The sea is
// a set of tilted facets with Gaussian slopes (Cox & Munk 1954); each facet reflects the sunlight it intercepts
// into its own mirror direction. The reflection bow is then the sum of the bows about those directions.
// Simplifications (stated in the manifest): isotropic slopes (the upwind/crosswind split is left out), facets that
// face away from the sun or send their light back down into the water are dropped (no shadowing, no second
// reflections), and the reflected directions are gathered by their elevation only (in the sun's vertical plane).

import { fresnelReflectance } from "../rays/fresnel.js";
import type { Vec3 } from "./vectors.js";
import { RADIANS_PER_DEGREE } from "./vectors.js";

/** Wind speeds (m/s, at 12.5 m above the sea) for which Cox & Munk (1954) measured the slopes: about 1–14 m/s. */
export const COX_MUNK_WIND_RANGE_MS = { min: 1, max: 14 } as const;

/**
 * Mean square slope of a clean sea, both components together (σ_u² + σ_c²), for wind speed U at 12.5 m:
 * Cox & Munk 1954 (J. Opt. Soc. Am. 44, 838), the clean-surface fit σ² = 0.003 + 5.12·10⁻³·U (± 0.004).
 */
export function coxMunkMeanSquareSlope(windSpeedMs: number): number {
  return 0.003 + 5.12e-3 * windSpeedMs;
}

/**
 * Isotropic Gaussian slope density p(zx, zy) = exp(−(zx² + zy²)/σ²)/(πσ²), σ² the mean square slope
 * (Cox & Munk 1954, the Gaussian leading term of their Gram–Charlier series, with σ_u = σ_c).
 */
export function slopeDensity(zx: number, zy: number, meanSquareSlope: number): number {
  return Math.exp(-(zx * zx + zy * zy) / meanSquareSlope) / (Math.PI * meanSquareSlope);
}

/**
 * Share of the sunlight falling on the horizontal sea that facets of slopes (zx, zy) intercept per unit slope area,
 * p · cos ω / (cos β · cos θ₀), ω the incidence on the facet, β its tilt, θ₀ the sun's zenith
 * angle. The facet's area is dA/cos β and its area seen from the sun cos ω of that; the horizontal area receives
 * cos θ₀ (the projected-area factor of Cox & Munk's 1954 glitter formula; its form from memory, derived here).
 * Returns 0 for facets facing away from the sun.
 */
export function interceptedShare(cosIncidence: number, cosTilt: number, cosSunZenith: number, density: number): number {
  return cosIncidence > 0 ? (density * cosIncidence) / (cosTilt * cosSunZenith) : 0;
}

/** One group of facets: the direction their reflected light travels, and its share of the sunlight per polarisation. */
export interface GlitterSample {
  /** Unit travel direction of the reflected light: the centre of this group's reflection bow. */
  direction: Vec3;
  /** Shares of the sunlight (horizontal sea) reflected by this group, s and p parts (each the facets' Fresnel Rs, Rp). */
  rs: number;
  rp: number;
}

export interface Glitter {
  meanSquareSlope: number;
  samples: GlitterSample[];
  /** Sum over samples of (rs + rp)/2: the sea's reflectance for the sunlight. */
  totalReflectance: number;
}

/** Steps of the slope grid per axis, and its half-width in σ of one component: the Gaussian beyond 4σ holds 6e-5. */
const GRID_STEPS = 400;
const GRID_HALF_WIDTH_SIGMAS = 4;
/**
 * The reflected directions are gathered in elevation bins this wide. Measured against 0.5° bins (sky map 360 × 180,
 * 0.5 mm drops, sun 8°, winds 1, 2 and 10 m/s): the largest difference is 7e-3, 5.6e-3 and 3.3e-3 of the image's
 * peak Y with half the groups (2° bins: 2.6e-2); test/pipeline/compute/rough-water.test.ts keeps it under 1e-2.
 */
export const GLITTER_BIN_DEG = 1;

/**
 * The glitter of the sun off rough water: a midpoint rule over the slope plane (GRID_STEPS² facets out to ±4σ of
 * each component), each facet reflecting its intercepted share with its own Fresnel reflectances (Born & Wolf 1999
 * §1.5.2) into its mirror direction r = i − 2(i·n)n (i the sunlight's travel direction). The facets are gathered in
 * bins of reflected elevation; each bin's light travels at its weighted mean elevation, at the azimuth of the calm
 * reflection (the azimuthal spread is left out).
 */
export function glitterOf(sunDirection: Vec3, refractiveIndex: number, meanSquareSlope: number, binDeg = GLITTER_BIN_DEG): Glitter {
  const ix = -sunDirection[0];
  const iy = -sunDirection[1];
  const iz = -sunDirection[2];
  const cosSunZenith = sunDirection[2];
  const horizontal = Math.hypot(ix, iy);
  const awayX = horizontal > 1e-12 ? ix / horizontal : 1;
  const awayY = horizontal > 1e-12 ? iy / horizontal : 0;
  const sigma = Math.sqrt(meanSquareSlope / 2);
  const half = GRID_HALF_WIDTH_SIGMAS * sigma;
  const step = (2 * half) / GRID_STEPS;
  const bins = new Map<number, { w: number; rs: number; rp: number; elevation: number }>();
  let total = 0;
  for (let a = 0; a < GRID_STEPS; a++) {
    const zx = -half + (a + 0.5) * step;
    for (let b = 0; b < GRID_STEPS; b++) {
      const zy = -half + (b + 0.5) * step;
      // Facet normal of the surface z = zx·x + zy·y: (−zx, −zy, 1)/√(1 + zx² + zy²).
      const norm = Math.sqrt(1 + zx * zx + zy * zy);
      const nx = -zx / norm;
      const ny = -zy / norm;
      const nz = 1 / norm;
      const cosIncidence = -(ix * nx + iy * ny + iz * nz);
      const share = interceptedShare(cosIncidence, nz, cosSunZenith, slopeDensity(zx, zy, meanSquareSlope)) * step * step;
      if (share === 0) continue;
      const rz = iz + 2 * cosIncidence * nz;
      if (rz <= 0) continue;
      const f = fresnelReflectance(refractiveIndex, Math.sqrt(Math.max(0, 1 - cosIncidence * cosIncidence)));
      const elevationDeg = Math.asin(Math.min(1, rz)) / RADIANS_PER_DEGREE;
      const key = Math.floor(elevationDeg / binDeg);
      const bin = bins.get(key) ?? { w: 0, rs: 0, rp: 0, elevation: 0 };
      const w = share * (f.perpendicular + f.parallel) / 2;
      bin.w += w;
      bin.rs += share * f.perpendicular;
      bin.rp += share * f.parallel;
      bin.elevation += w * elevationDeg;
      bins.set(key, bin);
      total += w;
    }
  }
  const samples: GlitterSample[] = [];
  for (const key of [...bins.keys()].sort((p, q) => p - q)) {
    const bin = bins.get(key)!;
    if (bin.w <= 0) continue;
    const e = (bin.elevation / bin.w) * RADIANS_PER_DEGREE;
    samples.push({ direction: [awayX * Math.cos(e), awayY * Math.cos(e), Math.sin(e)], rs: bin.rs, rp: bin.rp });
  }
  return { meanSquareSlope, samples, totalReflectance: total };
}
