import { mieCoefficients } from "../lib/mie/coefficients.js";
import { mieAmplitudes } from "../lib/mie/amplitudes.js";
import { allocateAmplitudes } from "../lib/mie/types.js";
import { timeIt } from "./timing.js";

export interface MieBenchRow {
  x: number;
  nTerms: number;
  angles: number;
  coefficientsMs: number;
  amplitudesMs: number;
  /** partial waves × angles per second in the amplitude kernel */
  termAnglesPerSecond: number;
}

/** Water (m = 1.333) at x = 100 … 50000 over 3001 angles, Θ = 120–150° in 0.01° steps. */
export function benchMie(sizes: number[] = [100, 1000, 10000, 50000]): MieBenchRow[] {
  const angles = 3001;
  const cosT = Float64Array.from({ length: angles }, (_, i) => Math.cos(((120 + 0.01 * i) * Math.PI) / 180));
  const out = allocateAmplitudes(angles);
  return sizes.map((x) => {
    const coeffTiming = timeIt(() => mieCoefficients(1.333, 0, x).aRe[0]);
    const c = mieCoefficients(1.333, 0, x);
    const ampTiming = timeIt(() => mieAmplitudes(c, cosT, out).s1Re[angles >> 1], { runs: x > 20000 ? 3 : 7 });
    return {
      x,
      nTerms: c.nTerms,
      angles,
      coefficientsMs: coeffTiming.medianMs,
      amplitudesMs: ampTiming.medianMs,
      termAnglesPerSecond: (c.nTerms * angles) / (ampTiming.medianMs / 1000),
    };
  });
}
