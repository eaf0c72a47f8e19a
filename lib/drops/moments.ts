import { type DropSizeDistribution, radiusMoment } from "./distributions.js";

/** Density of liquid water taken as 1 g cm⁻³ = 1e6 g m⁻³ (common practice; 0.9982 at 20 °C). */
export const WATER_DENSITY_G_PER_M3 = 1e6;

export function totalNumberPerM3(dist: DropSizeDistribution): number {
  return radiusMoment(dist, 0);
}

/** ⟨r²⟩ in µm², the mean geometric cross-section over π. */
export function meanSquaredRadiusUm2(dist: DropSizeDistribution): number {
  return radiusMoment(dist, 2) / radiusMoment(dist, 0);
}

/** W = ρ_w (4π/3) ∫ r³ n(r) dr, g m⁻³ (µm³ → m³: 1e-18). */
export function liquidWaterContentGPerM3(dist: DropSizeDistribution): number {
  return WATER_DENSITY_G_PER_M3 * ((4 * Math.PI) / 3) * radiusMoment(dist, 3) * 1e-18;
}

/** Radar reflectivity factor Z = ∫ D⁶ N(D) dD, mm⁶ m⁻³ (D = 2r; µm⁶ → mm⁶: 1e-18). */
export function reflectivityFactorMm6PerM3(dist: DropSizeDistribution): number {
  return 64 * radiusMoment(dist, 6) * 1e-18;
}
