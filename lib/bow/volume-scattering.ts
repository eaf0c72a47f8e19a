// Light scattered by a volume of drops per unit solid angle, for unpolarised incident light:
// β_j(Θ, λ) = Σ_i w_i |S_j(r_i, λ, Θ)|² / (2 k²), j = perpendicular (S1) or parallel (S2), k = 2π n_air/λ
// (Bohren & Huffman 1983 Eq. 3.12 and §3.4 for one drop, summed incoherently over a radius quadrature).

import { dropRow, dropRowContext } from "./drop-rows.js";

export type DropEngine = "mie" | "airy" | "geometric";

/** Debye orders (chords) carried by the approximate engines: reflection, transmission and the first five bows. */
export const RAY_ORDERS = [0, 1, 2, 3, 4, 5, 6] as const;
/**
 * Bows treated by Airy theory, in its uniform form (lib/bow/airy-bins.ts), in the "airy" engine; p = 0, 1 stay
 * ray optics. p = 4–6 are included because as bare ray caustics they put a spike into every wavelength's profile
 * (the fifth-order bow, p = 6, crosses Alexander's band: ΔE up to 10 against Mie at 150 µm, bench/auto-engine.ts).
 */
export const AIRY_BOW_ORDERS = [2, 3, 4, 5, 6] as const;

export interface VolumeScatteringInput {
  /** Quadrature nodes (µm) and weights (drops per m³ each node stands for). */
  radiiUm: Float64Array;
  weightsPerM3: Float64Array;
  /** Vacuum wavelengths, nm. */
  wavelengthsNm: Float64Array;
  /** Drop index relative to air, and air's index (for the wavelength in air), per wavelength. */
  mRe: Float64Array;
  mIm: Float64Array;
  nAir: Float64Array;
  /** Scattering angles Θ (degrees), ascending and evenly spaced by stepDeg; values are bin means for the ray engines. */
  thetaDeg: Float64Array;
  stepDeg: number;
  engineForRadius: (radiusUm: number) => DropEngine;
}

export interface VolumeScattering {
  /** β per wavelength row: index λ·nθ + j, in m⁻¹ sr⁻¹. */
  perpendicular: Float64Array;
  parallel: Float64Array;
  /** Mie terms × angles spent, a measure of cost. */
  mieTermAngles: number;
}

export function volumeScattering(input: VolumeScatteringInput): VolumeScattering {
  const { radiiUm, weightsPerM3, wavelengthsNm, thetaDeg, stepDeg } = input;
  const nTheta = thetaDeg.length;
  const perpendicular = new Float64Array(wavelengthsNm.length * nTheta);
  const parallel = new Float64Array(wavelengthsNm.length * nTheta);
  const engines = Array.from(radiiUm, (r) => input.engineForRadius(r));
  let mieTermAngles = 0;
  const rowPerp = new Float64Array(nTheta);
  const rowPar = new Float64Array(nTheta);
  for (let l = 0; l < wavelengthsNm.length; l++) {
    const medium = { wavelengthNm: wavelengthsNm[l], mRe: input.mRe[l], mIm: input.mIm[l], nAir: input.nAir[l] };
    const ctx = dropRowContext(medium, thetaDeg, stepDeg, new Set(engines));
    const perDrop = 1 / (2 * ctx.waveNumberPerM * ctx.waveNumberPerM);
    for (let i = 0; i < radiiUm.length; i++) {
      const w = weightsPerM3[i] * perDrop;
      if (w === 0) continue;
      mieTermAngles += dropRow(ctx, engines[i], radiiUm[i], rowPerp, rowPar);
      const base = l * nTheta;
      for (let j = 0; j < nTheta; j++) {
        perpendicular[base + j] += w * rowPerp[j];
        parallel[base + j] += w * rowPar[j];
      }
    }
  }
  return { perpendicular, parallel, mieTermAngles };
}
