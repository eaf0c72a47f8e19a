/** Partial-wave coefficients; index n−1 holds the coefficient of order n. */
export interface MieCoefficients {
  nTerms: number;
  aRe: Float64Array;
  aIm: Float64Array;
  bRe: Float64Array;
  bIm: Float64Array;
}

/** Scattering amplitudes S1, S2 (Bohren & Huffman 1983 sign convention), one entry per angle. */
export interface MieAmplitudes {
  s1Re: Float64Array;
  s1Im: Float64Array;
  s2Re: Float64Array;
  s2Im: Float64Array;
}

export interface MieEfficiencies {
  qExt: number;
  qSca: number;
  /** Bohren & Huffman 1983 definition: 4|S1(180°)|²/x². */
  qBack: number;
  /** Asymmetry parameter ⟨cos Θ⟩. */
  g: number;
}

export function allocateCoefficients(nTerms: number): MieCoefficients {
  return {
    nTerms,
    aRe: new Float64Array(nTerms),
    aIm: new Float64Array(nTerms),
    bRe: new Float64Array(nTerms),
    bIm: new Float64Array(nTerms),
  };
}

export function allocateAmplitudes(nAngles: number): MieAmplitudes {
  return {
    s1Re: new Float64Array(nAngles),
    s1Im: new Float64Array(nAngles),
    s2Re: new Float64Array(nAngles),
    s2Im: new Float64Array(nAngles),
  };
}

/** Rejects inputs outside the model: x > 0 finite, m finite, Im m ≥ 0 (absorbing, B&H convention). */
export function assertSphereInput(mRe: number, mIm: number, x: number): void {
  if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`size parameter must be finite and > 0, got ${x}`);
  if (!Number.isFinite(mRe) || !Number.isFinite(mIm)) throw new RangeError(`refractive index must be finite`);
  if (mIm < 0) throw new RangeError(`imaginary part of m must be ≥ 0 (Bohren & Huffman sign), got ${mIm}`);
  if (mRe === 0 && mIm === 0) throw new RangeError(`refractive index must not be 0`);
}
