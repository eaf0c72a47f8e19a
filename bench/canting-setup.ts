// What the canting benchmarks (bench/canting-spread.ts, bench/canting-splat.ts) measure on, shared so that their
// figures are over the same drops, light and angles: equilibrium drops canted by σ 7.5° (Huang, Bringi & Thurai 2008),
// the sun 10° up, one wavelength (550 nm, n 1.3345), Θ 118–153° (ψ 27–62°) on 0.05° bins, figures over ψ 30–58°
// (clear of the grid's ends), rows seen through the sun's disc (Neckel & Labs 1994 limb darkening, as profiles), and
// the brute-force canting integral over the pupil both take as their first reference.

import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { convolveProfile, sunDiscKernel, SUN_MEAN_ANGULAR_DIAMETER_DEG } from "../lib/sun/disc.js";
import { pupilCantingRow, type PupilCantingGrid } from "./canting-pupil.js";
import { rowErrors } from "./row-errors.js";

export const SD_DEG = 7.5;
export const SUN_DEG = 10;
export const STEP_DEG = 0.05;
export const N_RE = 1.3345;
export const WAVELENGTH_UM = 0.55;
export const THETA_DEG = Float64Array.from({ length: 700 }, (_, j) => 118.025 + STEP_DEG * j);
const FROM = 80;
const TO = 640;

/**
 * The pupil brute force's grid: measured on 2 mm drops at the top, this grid against one of pupil step 0.004 and
 * elevations 1° apart differs by 0.048 of the peak at worst (the secondary's sharp edge at ψ 39.9°, which moves 0.24° per
 * degree of elevation), 0.011 summed.
 */
export const PUPIL_GRID: PupilCantingGrid = { du: 0.005, elevationStepDeg: 0.5, spanSd: 3.5 };

/** Size parameter of a drop of this radius at WAVELENGTH_UM. */
export const sizeParameter = (radiusUm: number) => (2 * Math.PI * radiusUm) / WAVELENGTH_UM;

const disc = sunDiscKernel(SUN_MEAN_ANGULAR_DIAMETER_DEG, STEP_DEG);
/** |S1|² + |S2|² through the sun's disc. */
export const seen = (perp: Float64Array, par: Float64Array) => convolveProfile(perp.map((v, j) => v + par[j]), disc);

/** The brute-force canting mean over the pupil at this place, in the engine's units (× x²), through the sun's disc. */
export function pupilReference(radiusUm: number, arcPositionDeg: number): Float64Array {
  const x = sizeParameter(radiusUm);
  // The pupil's rows are per unit solid angle; the engine's scale with x² (shaped-plane-rows.ts shapedPlaneRow).
  const row = pupilCantingRow(equilibriumOutline(radiusUm), N_RE, SUN_DEG, arcPositionDeg, SD_DEG, THETA_DEG[0] - STEP_DEG / 2, STEP_DEG, THETA_DEG.length, PUPIL_GRID);
  return convolveProfile(row.map((v) => v * x * x), disc);
}

/** rowErrors over ψ 30–58°. */
export const errors = (row: Float64Array, reference: Float64Array) => rowErrors(row, reference, FROM, TO);
