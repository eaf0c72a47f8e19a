import { logGamma } from "./gamma-function.js";

/** Drop size distributions; number density per radius n(r) is in m⁻³ µm⁻¹. */
export type DropSizeDistribution =
  | { readonly kind: "monodisperse"; readonly radiusUm: number; readonly totalNumberPerM3: number }
  | { readonly kind: "marshall-palmer"; readonly rainRateMmPerH: number }
  | { readonly kind: "gamma"; readonly n0: number; readonly mu: number; readonly lambdaPerMm: number }
  | { readonly kind: "gamma-d0"; readonly medianVolumeDiameterMm: number; readonly mu: number; readonly totalNumberPerM3: number }
  | { readonly kind: "lognormal"; readonly medianRadiusUm: number; readonly geometricSd: number; readonly totalNumberPerM3: number }
  | { readonly kind: "histogram"; readonly edgesUm: readonly number[]; readonly numberPerM3: readonly number[] };

/** Marshall & Palmer 1948 (J. Meteorol. 5, 165): N0 = 8000 m⁻³ mm⁻¹. */
export const MARSHALL_PALMER_N0_PER_M3_PER_MM = 8000;

/** Marshall & Palmer 1948: Λ = 4.1 R^−0.21 mm⁻¹, R in mm h⁻¹. */
export function marshallPalmerSlopePerMm(rainRateMmPerH: number): number {
  if (!(rainRateMmPerH > 0)) throw new RangeError("rain rate must be positive");
  return 4.1 * rainRateMmPerH ** -0.21;
}

/** Ulbrich 1983 (J. Climate Appl. Meteor. 22, 1764): Λ D0 = 3.67 + μ, the median-volume relation of a gamma DSD. */
export function gammaSlopeFromMedianVolumeDiameter(medianVolumeDiameterMm: number, mu: number): number {
  if (!(medianVolumeDiameterMm > 0)) throw new RangeError("median volume diameter must be positive");
  return (3.67 + mu) / medianVolumeDiameterMm;
}

/** N(D) = N0 D^μ e^(−ΛD) in diameter (mm), as a gamma law; Marshall–Palmer is μ = 0. */
export interface DiameterGamma {
  readonly n0: number;
  readonly mu: number;
  readonly lambdaPerMm: number;
}

/** Gamma-in-diameter form of a distribution, or null for the others. */
export function asDiameterGamma(dist: DropSizeDistribution): DiameterGamma | null {
  switch (dist.kind) {
    case "marshall-palmer":
      return { n0: MARSHALL_PALMER_N0_PER_M3_PER_MM, mu: 0, lambdaPerMm: marshallPalmerSlopePerMm(dist.rainRateMmPerH) };
    case "gamma":
      return { n0: dist.n0, mu: dist.mu, lambdaPerMm: dist.lambdaPerMm };
    case "gamma-d0": {
      const lambdaPerMm = gammaSlopeFromMedianVolumeDiameter(dist.medianVolumeDiameterMm, dist.mu);
      // Total N_T = N0 Γ(μ+1) Λ^−(μ+1) (integral of the gamma law), solved for N0.
      const n0 = dist.totalNumberPerM3 * Math.exp((dist.mu + 1) * Math.log(lambdaPerMm) - logGamma(dist.mu + 1));
      return { n0, mu: dist.mu, lambdaPerMm };
    }
    default:
      return null;
  }
}

export function validateDistribution(dist: DropSizeDistribution): void {
  const bad = (msg: string) => {
    throw new RangeError(msg);
  };
  switch (dist.kind) {
    case "monodisperse":
      if (!(dist.radiusUm > 0) || !(dist.totalNumberPerM3 >= 0)) bad("monodisperse needs radiusUm > 0 and totalNumberPerM3 ≥ 0");
      return;
    case "marshall-palmer":
      if (!(dist.rainRateMmPerH > 0)) bad("rain rate must be positive");
      return;
    case "gamma":
      if (!(dist.n0 >= 0) || !(dist.mu > -1) || !(dist.lambdaPerMm > 0)) bad("gamma needs n0 ≥ 0, μ > −1, Λ > 0");
      return;
    case "gamma-d0":
      if (!(dist.medianVolumeDiameterMm > 0) || !(dist.mu > -1) || !(dist.totalNumberPerM3 >= 0)) bad("gamma-d0 needs D0 > 0, μ > −1, N ≥ 0");
      return;
    case "lognormal":
      if (!(dist.medianRadiusUm > 0) || !(dist.geometricSd > 1) || !(dist.totalNumberPerM3 >= 0)) bad("lognormal needs median > 0, σg > 1, N ≥ 0");
      return;
    case "histogram": {
      const e = dist.edgesUm;
      if (e.length < 2 || dist.numberPerM3.length !== e.length - 1) bad("histogram needs k+1 edges for k bins");
      for (let i = 0; i < e.length; i++) if (!(e[i] > 0) || (i > 0 && !(e[i] > e[i - 1]))) bad("histogram edges must be positive and ascending");
      for (const v of dist.numberPerM3) if (!(v >= 0)) bad("histogram numbers must be ≥ 0");
      return;
    }
    default:
      bad(`unknown distribution kind ${String((dist as { kind: unknown }).kind)}`);
  }
}

/** n(r) in m⁻³ µm⁻¹; the monodisperse kind is a delta and has no density. */
export function numberDensityPerUm(dist: DropSizeDistribution, radiusUm: number): number {
  if (!(radiusUm > 0)) return 0;
  const g = asDiameterGamma(dist);
  if (g) {
    const dMm = (2 * radiusUm) / 1000;
    // n(r) = N(D) dD/dr, dD/dr = 2, per µm of radius: × 1e-3 mm/µm.
    return 2e-3 * g.n0 * dMm ** g.mu * Math.exp(-g.lambdaPerMm * dMm);
  }
  switch (dist.kind) {
    case "lognormal": {
      const s = Math.log(dist.geometricSd);
      const z = Math.log(radiusUm / dist.medianRadiusUm) / s;
      // Lognormal number density (Aitchison & Brown 1957; common practice for fog and cloud).
      return (dist.totalNumberPerM3 / (radiusUm * s * Math.sqrt(2 * Math.PI))) * Math.exp(-0.5 * z * z);
    }
    case "histogram": {
      const e = dist.edgesUm;
      for (let i = 0; i < e.length - 1; i++) if (radiusUm >= e[i] && radiusUm < e[i + 1]) return dist.numberPerM3[i] / (e[i + 1] - e[i]);
      return 0;
    }
    case "monodisperse":
      throw new RangeError("a monodisperse distribution has no density function; use its quadrature");
    default:
      throw new RangeError("unknown distribution");
  }
}

/** ∫ r^k n(r) dr in µm^k m⁻³, exact for every kind. */
export function radiusMoment(dist: DropSizeDistribution, k: number): number {
  validateDistribution(dist);
  const g = asDiameterGamma(dist);
  if (g) {
    // ∫ D^k N0 D^μ e^(−ΛD) dD = N0 Γ(μ+k+1)/Λ^(μ+k+1) (Euler's integral); r = D/2, 1 mm = 1000 µm.
    const logDiameterMoment = Math.log(g.n0) + logGamma(g.mu + k + 1) - (g.mu + k + 1) * Math.log(g.lambdaPerMm);
    return Math.exp(logDiameterMoment) * 500 ** k;
  }
  switch (dist.kind) {
    case "monodisperse":
      return dist.totalNumberPerM3 * dist.radiusUm ** k;
    case "lognormal": {
      // E[r^k] = r_m^k exp(k² ln²σg / 2) (moments of the lognormal law).
      const s = Math.log(dist.geometricSd);
      return dist.totalNumberPerM3 * dist.medianRadiusUm ** k * Math.exp(0.5 * k * k * s * s);
    }
    case "histogram": {
      let sum = 0;
      const e = dist.edgesUm;
      for (let i = 0; i < e.length - 1; i++) {
        const a = e[i];
        const b = e[i + 1];
        const integral = k === -1 ? Math.log(b / a) : (b ** (k + 1) - a ** (k + 1)) / (k + 1);
        sum += (dist.numberPerM3[i] / (b - a)) * integral;
      }
      return sum;
    }
    default:
      throw new RangeError("unknown distribution");
  }
}
