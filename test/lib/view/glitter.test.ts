// The glitter of the sun on rough water (Cox & Munk 1954): its total reflected share against an independent
// integration, its calm limit, and where its light goes.
import { describe, it, expect } from "vitest";
import { coxMunkMeanSquareSlope, glitterOf, GLITTER_BIN_DEG, type Glitter } from "../../../lib/view/glitter.js";
import type { Vec3 } from "../../../lib/view/vectors.js";

const N_WATER = 1.333;
const rad = (deg: number) => (deg * Math.PI) / 180;
const sunAt = (elevationDeg: number): Vec3 => [0, -Math.cos(rad(elevationDeg)), Math.sin(rad(elevationDeg))];

/** Unpolarised Fresnel reflectance air → water, (Rs + Rp)/2 (Born & Wolf 1999 §1.5.2, Eqs. 21 squared), written here. */
function fresnelUnpolarised(n: number, cosIncidence: number): number {
  const i = Math.acos(Math.min(1, cosIncidence));
  if (i < 1e-9) return ((n - 1) / (n + 1)) ** 2;
  const t = Math.asin(Math.sin(i) / n);
  const s = Math.sin(i - t) / Math.sin(i + t);
  const p = Math.tan(i - t) / Math.tan(i + t);
  return (s * s + p * p) / 2;
}

/**
 * The sea's reflectance for the sunlight integrated independently of lib/: in polar coordinates of the facet
 * normal (tilt β, azimuth α), slope density p(tan β) (Cox & Munk 1954, isotropic Gaussian) with the Jacobian
 * dzx dzy = tan β sec²β dβ dα, times ρ(ω)·cos ω/(cos β cos θ₀) (the projected-area factor of the glitter
 * formula), over facets lit by the sun whose light goes upwards. Midpoint rule, 3000 × 1440 cells out to tan β = 6σ.
 */
function reflectanceByPolarIntegration(sunElevationDeg: number, meanSquareSlope: number): number {
  const sun = sunAt(sunElevationDeg);
  const i = [-sun[0], -sun[1], -sun[2]];
  const betaMax = Math.atan(6 * Math.sqrt(meanSquareSlope));
  const nb = 3000;
  const na = 1440;
  const db = betaMax / nb;
  const da = (2 * Math.PI) / na;
  let sum = 0;
  for (let a = 0; a < nb; a++) {
    const beta = (a + 0.5) * db;
    const tanB = Math.tan(beta);
    const density = Math.exp(-(tanB * tanB) / meanSquareSlope) / (Math.PI * meanSquareSlope);
    const jacobian = tanB / Math.cos(beta) ** 2;
    for (let b = 0; b < na; b++) {
      const alpha = (b + 0.5) * da;
      const n = [Math.sin(beta) * Math.cos(alpha), Math.sin(beta) * Math.sin(alpha), Math.cos(beta)];
      const cosW = -(i[0] * n[0] + i[1] * n[1] + i[2] * n[2]);
      if (cosW <= 0 || i[2] + 2 * cosW * n[2] <= 0) continue;
      sum += fresnelUnpolarised(N_WATER, cosW) * density * jacobian * (cosW / (Math.cos(beta) * sun[2])) * db * da;
    }
  }
  return sum;
}

const elevationDeg = (v: Vec3) => Math.asin(v[2]) / (Math.PI / 180);

/** Elevation below which half the glitter's reflected light travels. */
function medianElevationDeg(g: Glitter): number {
  let acc = 0;
  for (const s of g.samples) {
    acc += (s.rs + s.rp) / 2;
    if (acc >= g.totalReflectance / 2) return elevationDeg(s.direction);
  }
  return NaN;
}

describe("the glitter of rough water", () => {
  it("uses Cox & Munk's clean-surface mean square slope, σ² = 0.003 + 5.12e-3·U", () => {
    // Cox & Munk 1954 (J. Opt. Soc. Am. 44, 838): at 10 m/s, σ² = 0.0542.
    expect(coxMunkMeanSquareSlope(10)).toBeCloseTo(0.0542, 12);
    expect(coxMunkMeanSquareSlope(0)).toBe(0.003);
  });

  for (const [sunDeg, wind] of [
    [30, 2],
    [30, 10],
    [8, 10],
  ]) {
    it(`reflects the share of the sunlight that an independent integration gives (sun ${sunDeg}°, ${wind} m/s), within 1e-3`, () => {
      const g = glitterOf(sunAt(sunDeg), N_WATER, coxMunkMeanSquareSlope(wind));
      const reference = reflectanceByPolarIntegration(sunDeg, coxMunkMeanSquareSlope(wind));
      console.log(`sun ${sunDeg}°, ${wind} m/s: glitter ${g.totalReflectance.toFixed(6)}, polar integration ${reference.toFixed(6)}, ${g.samples.length} groups`);
      expect(Math.abs(g.totalReflectance / reference - 1)).toBeLessThan(1e-3);
      // The groups' s and p shares add up to the total.
      const sum = g.samples.reduce((a, s) => a + (s.rs + s.rp) / 2, 0);
      expect(sum).toBeCloseTo(g.totalReflectance, 12);
    });
  }

  it("tends to the level mirror as the slopes vanish: Fresnel's reflectance at the sun's incidence, at the mirrored elevation", () => {
    const g = glitterOf(sunAt(30), N_WATER, 1e-6);
    // Level water: ρ at incidence 60° (Born & Wolf 1999 §1.5.2).
    expect(Math.abs(g.totalReflectance / fresnelUnpolarised(N_WATER, Math.cos(rad(60))) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(medianElevationDeg(g) - 30)).toBeLessThanOrEqual(GLITTER_BIN_DEG);
  });

  it("spreads its light wider as the wind grows, about the mirrored sun's elevation", () => {
    const spread = (g: Glitter) => {
      const mean = g.samples.reduce((a, s) => a + elevationDeg(s.direction) * (s.rs + s.rp) / 2, 0) / g.totalReflectance;
      return Math.sqrt(g.samples.reduce((a, s) => a + (elevationDeg(s.direction) - mean) ** 2 * (s.rs + s.rp) / 2, 0) / g.totalReflectance);
    };
    const light = glitterOf(sunAt(30), N_WATER, coxMunkMeanSquareSlope(2));
    const strong = glitterOf(sunAt(30), N_WATER, coxMunkMeanSquareSlope(10));
    expect(spread(strong)).toBeGreaterThan(1.5 * spread(light));
    // A facet tilted by β turns the reflected ray by 2β: one standard deviation of a slope component (σ/√2) gives
    // 2·atan(σ/√2) ≈ 9.3° at 2 m/s. The median sits within that of the mirrored elevation (30°); it is lower
    // (measured 27.75°) because Fresnel's reflectance falls steeply for facets turned towards the sun.
    const oneSigmaDeg = 2 * Math.atan(Math.sqrt(coxMunkMeanSquareSlope(2) / 2)) / (Math.PI / 180);
    expect(Math.abs(medianElevationDeg(light) - 30)).toBeLessThan(oneSigmaDeg / 2);
  });
});
