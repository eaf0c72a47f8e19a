import { neckelLabs1994 } from "../data/neckel-labs-1994-limb-darkening.js";

// IAU 2015 Resolution B3 nominal solar radius (695 700 km exactly; Prša et al. 2016, AJ 152, 41) and IAU 2012
// Resolution B2 astronomical unit (149 597 870 700 m exactly).
export const NOMINAL_SOLAR_RADIUS_KM = 695700;
export const ASTRONOMICAL_UNIT_KM = 149597870.7;

/** Mean apparent diameter of the solar disc, 2·asin(R☉/au) ≈ 0.5329°. */
export const SUN_MEAN_ANGULAR_DIAMETER_DEG = (2 * Math.asin(NOMINAL_SOLAR_RADIUS_KM / ASTRONOMICAL_UNIT_KM) * 180) / Math.PI;

/** Row of Neckel & Labs 1994 used when no wavelength is given: 559.95 nm, near the peak of ȳ. */
export const LIMB_REFERENCE_WAVELENGTH_NM = 559.95;

export type LimbDarkening = "neckel-labs-1994" | "uniform";

/**
 * Coefficients A0..A5 of I(μ)/I(1) = Σ A_k μ^k (Neckel & Labs 1994, Sol. Phys. 153, 91, their
 * 5th-degree polynomial; equation number not checked), interpolated linearly in wavelength between the 30 tabulated rows (303–1099 nm).
 */
export function limbDarkeningCoefficients(wavelengthNm: number = LIMB_REFERENCE_WAVELENGTH_NM): Float64Array {
  const w = neckelLabs1994.wavelengthsNm;
  const n = w.length;
  if (!(wavelengthNm >= w[0] && wavelengthNm <= w[n - 1])) {
    throw new RangeError(`limb darkening is tabulated for ${w[0]}–${w[n - 1]} nm, not ${wavelengthNm} nm`);
  }
  let i = 0;
  while (i < n - 2 && w[i + 1] < wavelengthNm) i++;
  const t = (wavelengthNm - w[i]) / (w[i + 1] - w[i]);
  const c = neckelLabs1994.columns;
  const rows = [c.a0, c.a1, c.a2, c.a3, c.a4, c.a5];
  return Float64Array.from(rows.map((col) => col[i] + t * (col[i + 1] - col[i])));
}

/** I(μ)/I(1) for μ = cos of the heliocentric angle. */
export function limbDarkening(mu: number, coefficients: Float64Array): number {
  let sum = 0;
  for (let k = coefficients.length - 1; k >= 0; k--) sum = sum * mu + coefficients[k];
  return sum;
}

/** Disc-averaged over centre intensity, 2 Σ A_k/(k + 2) (Neckel & Labs 1994, last column of their table). */
export function discMeanOverCentre(coefficients: Float64Array): number {
  let s = 0;
  for (let k = 0; k < coefficients.length; k++) s += coefficients[k] / (k + 2);
  return 2 * s;
}

/** ∫_{−π/2}^{π/2} cosⁿφ dφ = √π Γ((n+1)/2)/Γ(n/2+1), by the recurrence c_n = c_{n−2}(n−1)/n. */
function cosPowerFullIntegral(n: number): number {
  let c = n % 2 === 0 ? Math.PI : 2;
  for (let m = n % 2 === 0 ? 2 : 3; m <= n; m += 2) c *= (m - 1) / m;
  return c;
}

/** Antiderivative of cosⁿθ by the reduction formula ∫cosⁿ = cosⁿ⁻¹ sin/n + (n−1)/n ∫cosⁿ⁻² (standard calculus). */
function cosPowerAntiderivative(n: number, theta: number): number {
  const s = Math.sin(theta);
  const c = Math.cos(theta);
  let value = n % 2 === 0 ? theta : s;
  for (let m = n % 2 === 0 ? 2 : 3; m <= n; m += 2) value = (c ** (m - 1) * s) / m + ((m - 1) / m) * value;
  return value;
}

export interface DiscKernel {
  readonly offsetsDeg: Float64Array;
  readonly weights: Float64Array;
}

/**
 * The disc's brightness integrated along lines perpendicular to the ψ axis (projection of I(μ) onto one axis),
 * averaged over bins of width stepDeg centred on k·stepDeg, normalised to sum 1. With u = R sin θ each strip
 * integral is exact: ∫∫ μ^k = R² c_{k+1} ∫ cos^{k+2}θ dθ, where c_n = ∫cosⁿφ dφ over (−π/2, π/2).
 * Diameter 0 gives the identity (point source).
 */
export function sunDiscKernel(
  discDiameterDeg: number,
  stepDeg: number,
  wavelengthNm?: number,
  law: LimbDarkening = "neckel-labs-1994",
): DiscKernel {
  if (!(stepDeg > 0)) throw new RangeError("kernel step must be positive");
  if (!(discDiameterDeg >= 0)) throw new RangeError("disc diameter must be ≥ 0");
  const radius = discDiameterDeg / 2;
  if (radius === 0) return { offsetsDeg: Float64Array.of(0), weights: Float64Array.of(1) };
  const coefficients = law === "uniform" ? Float64Array.of(1) : limbDarkeningCoefficients(wavelengthNm);
  const half = Math.ceil(radius / stepDeg - 0.5);
  const size = 2 * half + 1;
  const offsetsDeg = new Float64Array(size);
  const weights = new Float64Array(size);
  const thetaAt = (u: number) => Math.asin(Math.max(-1, Math.min(1, u / radius)));
  let total = 0;
  for (let j = 0; j < size; j++) {
    const u = (j - half) * stepDeg;
    offsetsDeg[j] = u;
    const ta = thetaAt(u - stepDeg / 2);
    const tb = thetaAt(u + stepDeg / 2);
    let w = 0;
    for (let k = 0; k < coefficients.length; k++) {
      w += coefficients[k] * cosPowerFullIntegral(k + 1) * (cosPowerAntiderivative(k + 2, tb) - cosPowerAntiderivative(k + 2, ta));
    }
    weights[j] = w;
    total += w;
  }
  for (let j = 0; j < size; j++) weights[j] /= total;
  return { offsetsDeg, weights };
}

/**
 * Convolve a profile sampled at the kernel's step with the kernel; near the ends only the weights that fall
 * on the profile are used and renormalised, so a flat profile stays flat.
 */
export function convolveProfile(profile: Float64Array, kernel: DiscKernel): Float64Array {
  const size = kernel.weights.length;
  if (size % 2 !== 1) throw new RangeError("kernel must have an odd number of taps centred on 0");
  const half = (size - 1) / 2;
  const n = profile.length;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    let norm = 0;
    for (let j = 0; j < size; j++) {
      const src = i - (j - half);
      if (src < 0 || src >= n) continue;
      sum += kernel.weights[j] * profile[src];
      norm += kernel.weights[j];
    }
    out[i] = sum / norm;
  }
  return out;
}
