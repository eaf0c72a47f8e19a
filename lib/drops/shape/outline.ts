// An axisymmetric drop outline r(μ)/a, a the radius of the sphere of equal volume, μ = cos θ with θ the polar
// angle from the symmetry axis's downward end (the convention of Beard & Chuang 1987, J. Atmos. Sci. 44, 1509,
// Eq. 1, and Chuang & Beard 1990, J. Atmos. Sci. 47, 1374, Eq. 18).

export interface DropOutline {
  /** r/a at μ = cos θ (θ from the downward axis). */
  radius(mu: number): number;
  /** d(r/a)/dμ. */
  radiusSlope(mu: number): number;
  /** An upper bound of r/a over the outline (a bounding sphere for the ray tracer). */
  maxRadius: number;
}

/** Vertical over horizontal extent: the outline's axis ratio, found on a fine grid in θ (0.05° steps, refined). */
export function outlineAxisRatio(outline: DropOutline): number {
  const steps = 3600;
  let zMin = Infinity;
  let zMax = -Infinity;
  let xMax = 0;
  for (let s = 0; s <= steps; s++) {
    const theta = (Math.PI * s) / steps;
    const r = outline.radius(Math.cos(theta));
    // z measured upward, so the downward pole (θ = 0) has z = −r.
    const z = -r * Math.cos(theta);
    const x = r * Math.sin(theta);
    zMin = Math.min(zMin, z);
    zMax = Math.max(zMax, z);
    xMax = Math.max(xMax, x);
  }
  return (zMax - zMin) / (2 * xMax);
}

/** Volume over (4/3)π a³: V = (2π/3)∫ r³ sin θ dθ (volume of a solid of revolution in polar form), midpoint rule in μ. */
export function outlineVolumeRatio(outline: DropOutline): number {
  // Composite midpoint rule on μ with 20 000 cells: the integrand is smooth, error ~ 1e-9.
  const cells = 20000;
  let sum = 0;
  for (let c = 0; c < cells; c++) {
    const mu = -1 + (2 * (c + 0.5)) / cells;
    sum += outline.radius(mu) ** 3;
  }
  // (2π/3)∫₋₁¹ r³ dμ over (4π/3) = ½∫ r³ dμ.
  return (0.5 * sum * 2) / cells;
}

/** The sphere of radius a. */
export const SPHERE_OUTLINE: DropOutline = { radius: () => 1, radiusSlope: () => 0, maxRadius: 1 };

/**
 * An oblate spheroid of the given axis ratio (polar over equatorial) and the volume of the unit sphere:
 * equatorial A = q^(−1/3), polar C = q^(2/3), r(μ) = 1/√((1 − μ²)/A² + μ²/C²) (polar equation of an ellipse).
 */
export function spheroidOutline(axisRatio: number): DropOutline {
  const a2 = axisRatio ** (-2 / 3);
  const c2 = axisRatio ** (4 / 3);
  const invA2 = 1 / a2;
  const invC2 = 1 / c2;
  const radius = (mu: number) => 1 / Math.sqrt((1 - mu * mu) * invA2 + mu * mu * invC2);
  return {
    radius,
    radiusSlope: (mu) => -(radius(mu) ** 3) * mu * (invC2 - invA2),
    maxRadius: Math.max(Math.sqrt(a2), Math.sqrt(c2)),
  };
}

/**
 * r/a = 1 + Σ c_n cos nθ (Beard & Chuang 1987 Eq. 1), evaluated with cos nθ = T_n(μ) and d/dμ T_n = n U_{n−1}(μ)
 * (Chebyshev polynomials: Abramowitz & Stegun 1964 Eq. 22.7.4, 22.8.3 (from memory)).
 */
export function cosineSeriesOutline(coefficients: ArrayLike<number>): DropOutline {
  const c = Float64Array.from(coefficients);
  const radius = (mu: number) => {
    let tPrev = 1;
    let t = mu;
    let r = 1 + c[0];
    for (let n = 1; n < c.length; n++) {
      r += c[n] * t;
      const next = 2 * mu * t - tPrev;
      tPrev = t;
      t = next;
    }
    return r;
  };
  const radiusSlope = (mu: number) => {
    let uPrev = 0;
    let u = 1;
    let slope = 0;
    for (let n = 1; n < c.length; n++) {
      slope += c[n] * n * u;
      const next = 2 * mu * u - uPrev;
      uPrev = u;
      u = next;
    }
    return slope;
  };
  let maxRadius = 1 + c.reduce((sum, v) => sum + Math.abs(v), 0);
  // The sum of |c_n| bounds r/a; a bound close to the real maximum saves ray-tracer steps.
  let found = 0;
  for (let s = 0; s <= 3600; s++) found = Math.max(found, radius(Math.cos((Math.PI * s) / 3600)));
  maxRadius = Math.min(maxRadius, found * (1 + 1e-3));
  return { radius, radiusSlope, maxRadius };
}
