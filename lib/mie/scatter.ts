import { mieAmplitudes } from "./amplitudes.js";
import { mieCoefficients } from "./coefficients.js";
import { mieEfficiencies } from "./efficiencies.js";
import type { MieAmplitudes, MieCoefficients, MieEfficiencies } from "./types.js";

export interface MieScatterResult extends MieAmplitudes, MieEfficiencies {
  nTerms: number;
  coefficients: MieCoefficients;
}

/** Coefficients, efficiencies and S1, S2 at the given scattering angles (degrees) in one call. */
export function mieScatter(
  mRe: number,
  mIm: number,
  x: number,
  scatteringAngleDeg: Float64Array,
): MieScatterResult {
  const coefficients = mieCoefficients(mRe, mIm, x);
  const cosTheta = new Float64Array(scatteringAngleDeg.length);
  for (let i = 0; i < cosTheta.length; i++) cosTheta[i] = Math.cos((scatteringAngleDeg[i] * Math.PI) / 180);
  const amplitudes = mieAmplitudes(coefficients, cosTheta);
  return { ...amplitudes, ...mieEfficiencies(coefficients, x), nTerms: coefficients.nTerms, coefficients };
}
