// An axisymmetric drop outline r(μ)/a, a the radius of the sphere of equal volume, μ = cos θ with θ the polar
// angle from the symmetry axis's downward end (the convention of Beard & Chuang 1987, J. Atmos. Sci. 44, 1509,
// Eq. 1, and Chuang & Beard 1990, J. Atmos. Sci. 47, 1374, Eq. 18).

export interface DropOutline {
  /** r/a at μ = cos θ (θ from the downward axis). */
  radius(mu: number): number;
  /** d(r/a)/dμ. */
  radiusSlope(mu: number): number;
  /**
   * r/a, d(r/a)/dμ and d²(r/a)/dμ² at μ into out[0], out[1], out[2], in one pass: the ray tracer needs the wall and its
   * normal at each step, and the normal's change along the wall for the ray differential, at the same μ.
   */
  radiusTerms(mu: number, out: Float64Array): void;
  /** r/a and d(r/a)/dμ at μ into out[0], out[1] (the ray tracer's root search, which needs no curvature). */
  radiusAndSlope(mu: number, out: Float64Array): void;
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
export const SPHERE_OUTLINE: DropOutline = {
  radius: () => 1,
  radiusSlope: () => 0,
  radiusTerms: (_mu, out) => {
    out[0] = 1;
    out[1] = 0;
    out[2] = 0;
  },
  radiusAndSlope: (_mu, out) => {
    out[0] = 1;
    out[1] = 0;
  },
  maxRadius: 1,
};

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
  const spread = invC2 - invA2;
  return {
    radius,
    radiusSlope: (mu) => -(radius(mu) ** 3) * mu * spread,
    // r = s^(−1/2), s = 1/A² + μ²(1/C² − 1/A²): r′ = −μ·Δ·r³, r″ = −Δ·r³ + 3μ²Δ²·r⁵ (differentiating twice).
    radiusTerms: (mu, out) => {
      const r = radius(mu);
      const r3 = r * r * r;
      out[0] = r;
      out[1] = -mu * spread * r3;
      out[2] = -spread * r3 + 3 * mu * mu * spread * spread * r3 * r * r;
    },
    radiusAndSlope: (mu, out) => {
      const r = radius(mu);
      out[0] = r;
      out[1] = -mu * spread * r * r * r;
    },
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
  // T_{n+1} = 2μT_n − T_{n−1} (A&S 22.7.4) differentiated once and twice: T′_{n+1} = 2T_n + 2μT′_n − T′_{n−1},
  // T″_{n+1} = 4T′_n + 2μT″_n − T″_{n−1}; the second derivative only when asked for (the tracer's root search needs none).
  const terms = (mu: number, out: Float64Array, curvature: boolean) => {
    let tPrev = 1;
    let t = mu;
    let dPrev = 0;
    let d = 1;
    let ddPrev = 0;
    let dd = 0;
    let r = 1 + c[0];
    let r1 = 0;
    let r2 = 0;
    for (let n = 1; n < c.length; n++) {
      const cn = c[n];
      r += cn * t;
      r1 += cn * d;
      if (curvature) {
        r2 += cn * dd;
        const ddNext = 4 * d + 2 * mu * dd - ddPrev;
        ddPrev = dd;
        dd = ddNext;
      }
      const dNext = 2 * t + 2 * mu * d - dPrev;
      const tNext = 2 * mu * t - tPrev;
      dPrev = d;
      d = dNext;
      tPrev = t;
      t = tNext;
    }
    out[0] = r;
    out[1] = r1;
    if (curvature) out[2] = r2;
  };
  const radiusTerms = (mu: number, out: Float64Array) => terms(mu, out, true);
  const radiusAndSlope = (mu: number, out: Float64Array) => terms(mu, out, false);
  let maxRadius = 1 + c.reduce((sum, v) => sum + Math.abs(v), 0);
  // The sum of |c_n| bounds r/a; a bound close to the real maximum saves ray-tracer steps.
  let found = 0;
  for (let s = 0; s <= 3600; s++) found = Math.max(found, radius(Math.cos((Math.PI * s) / 3600)));
  maxRadius = Math.min(maxRadius, found * (1 + 1e-3));
  return { radius, radiusSlope, radiusTerms, radiusAndSlope, maxRadius };
}
