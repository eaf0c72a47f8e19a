// Light scattered by a volume of drops per unit solid angle, for unpolarised incident light:
// β_j(Θ, λ) = Σ_i w_i |S_j(r_i, λ, Θ)|² / (2 k²), j = perpendicular (S1) or parallel (S2), k = 2π n_air/λ
// (Bohren & Huffman 1983 Eq. 3.12 and §3.4 for one drop, summed incoherently over a radius quadrature).

import { mieCoefficients } from "../mie/coefficients.js";
import { mieAmplitudes } from "../mie/amplitudes.js";
import { allocateAmplitudes } from "../mie/types.js";
import { rayOpticsBins, type RayBins } from "./ray-bins.js";
import { addUniformBowBins, uniformBowTable } from "./airy-bins.js";

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
  const { radiiUm, weightsPerM3, wavelengthsNm, mRe, mIm, nAir, thetaDeg, stepDeg } = input;
  const nTheta = thetaDeg.length;
  const perpendicular = new Float64Array(wavelengthsNm.length * nTheta);
  const parallel = new Float64Array(wavelengthsNm.length * nTheta);
  const cosTheta = thetaDeg.map((t) => Math.cos((t * Math.PI) / 180));
  const amplitudes = allocateAmplitudes(nTheta);
  const engines = Array.from(radiiUm, (r) => input.engineForRadius(r));
  const needsRays = engines.some((e) => e !== "mie");
  const needsAiry = engines.some((e) => e === "airy");
  let mieTermAngles = 0;

  const rowPerp = new Float64Array(nTheta);
  const rowPar = new Float64Array(nTheta);
  for (let l = 0; l < wavelengthsNm.length; l++) {
    const n = mRe[l];
    const waveNumberPerM = (2 * Math.PI * nAir[l]) / (wavelengthsNm[l] * 1e-9);
    const perDrop = 1 / (2 * waveNumberPerM * waveNumberPerM);
    const raysAll = needsRays ? rayOpticsBins(n, RAY_ORDERS, thetaDeg, stepDeg) : null;
    const raysNonAiry = needsRays ? rayOpticsBins(n, RAY_ORDERS.filter((p) => !(AIRY_BOW_ORDERS as readonly number[]).includes(p)), thetaDeg, stepDeg) : null;
    const raysAiryOrders = AIRY_BOW_ORDERS.map((p) => (needsAiry ? rayOpticsBins(n, [p], thetaDeg, stepDeg) : null));
    const bowTables = AIRY_BOW_ORDERS.map((p) => (needsAiry ? uniformBowTable(n, p, thetaDeg, stepDeg) : null));
    for (let i = 0; i < radiiUm.length; i++) {
      const w = weightsPerM3[i] * perDrop;
      if (w === 0) continue;
      const x = (waveNumberPerM * radiiUm[i]) * 1e-6;
      rowPerp.fill(0);
      rowPar.fill(0);
      if (engines[i] === "mie") {
        const c = mieCoefficients(n, mIm[l], x);
        mieAmplitudes(c, cosTheta, amplitudes);
        mieTermAngles += c.nTerms * nTheta;
        for (let j = 0; j < nTheta; j++) {
          rowPerp[j] = amplitudes.s1Re[j] ** 2 + amplitudes.s1Im[j] ** 2;
          rowPar[j] = amplitudes.s2Re[j] ** 2 + amplitudes.s2Im[j] ** 2;
        }
      } else if (engines[i] === "geometric") {
        addScaled(rowPerp, rowPar, raysAll!, x * x);
      } else {
        addScaled(rowPerp, rowPar, raysNonAiry!, x * x);
        AIRY_BOW_ORDERS.forEach((_, o) => {
          const table = bowTables[o]!;
          addUniformBowBins(table, x, 1, rowPerp, rowPar);
          // Where only one ray of the order arrives there is nothing to interfere: ray optics.
          const rays = raysAiryOrders[o]!;
          for (let j = 0; j < nTheta; j++) {
            if (table.uniform[j]) continue;
            rowPerp[j] += x * x * rays.perpendicular[j];
            rowPar[j] += x * x * rays.parallel[j];
          }
        });
      }
      const base = l * nTheta;
      for (let j = 0; j < nTheta; j++) {
        perpendicular[base + j] += w * rowPerp[j];
        parallel[base + j] += w * rowPar[j];
      }
    }
  }
  return { perpendicular, parallel, mieTermAngles };
}

function addScaled(perp: Float64Array, par: Float64Array, rays: RayBins, factor: number): void {
  for (let j = 0; j < perp.length; j++) {
    perp[j] += factor * rays.perpendicular[j];
    par[j] += factor * rays.parallel[j];
  }
}

