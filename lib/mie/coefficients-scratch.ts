// mieCoefficients into one module-wide workspace, for callers that handle one drop at a time on one thread.
import { createMieWorkspace, mieCoefficients } from "./coefficients.js";
import type { MieCoefficients } from "./types.js";

const workspace = createMieWorkspace();

/** a_n, b_n as mieCoefficients gives them, to the bit; valid until the next call (arrays may exceed nTerms). */
export function mieCoefficientsScratch(mRe: number, mIm: number, x: number): MieCoefficients {
  return mieCoefficients(mRe, mIm, x, undefined, workspace);
}
