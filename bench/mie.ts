import { mieCoefficients } from "../lib/mie/coefficients.js";
import { mieAmplitudes, mieAmplitudesScalar } from "../lib/mie/amplitudes.js";
import { simdAmplitudesAvailable } from "../lib/mie/simd-amplitudes.js";
import { allocateAmplitudes } from "../lib/mie/types.js";
import { timeIt } from "./timing.js";

export interface MieWorkload {
  name: string;
  x: number;
  mRe: number;
  mIm: number;
  fromDeg: number;
  toDeg: number;
  stepDeg: number;
  /** Whole-process seconds of other programs on this case, measured elsewhere (see BENCHMARKS.md). */
  anchors?: { miev0: number; scattnlay: number; miepython: number };
}

/** W1 at three sizes over the whole half-circle; W2 and W3 are the cases the anchor figures were taken on. */
export const mieWorkloads: MieWorkload[] = [
  ...[100, 1000, 10000].map((x) => ({ name: `W1 x=${x}`, x, mRe: 1.333, mIm: 0, fromDeg: 0, toDeg: 180, stepDeg: 0.1 })),
  { name: "W2 x=3000", x: 3000, mRe: 1.333, mIm: 0, fromDeg: 120, toDeg: 150, stepDeg: 0.01, anchors: { miev0: 0.044, scattnlay: 0.173, miepython: 6.1 } },
  {
    name: "W3 x=50000",
    x: 50000,
    mRe: 1.333,
    mIm: 1e-8,
    fromDeg: 130,
    toDeg: 145,
    stepDeg: 0.05,
    anchors: { miev0: 0.06, scattnlay: 0.285, miepython: 10.0 },
  },
];

export interface MieBenchRow {
  workload: MieWorkload;
  nTerms: number;
  angles: number;
  coefficientsMs: number;
  /** The kernel in use (WebAssembly SIMD where available) and the scalar TypeScript reference. */
  amplitudesMs: number;
  scalarMs: number;
  /** partial waves × angles per second on one core, kernel in use and scalar */
  termAnglesPerSecond: number;
  scalarTermAnglesPerSecond: number;
}

export function benchMie(workloads: MieWorkload[] = mieWorkloads): MieBenchRow[] {
  // V8 runs WebAssembly from its baseline compiler until the function has run a while: warm it up first, as a
  // running service has, so that the first row is not the only one timed on baseline code.
  const warmUp = mieCoefficients(1.333, 0, 3000);
  const warmUpCos = Float64Array.from({ length: 800 }, (_, i) => Math.cos(((115 + 0.05 * i) * Math.PI) / 180));
  for (let i = 0; i < 5; i++) mieAmplitudes(warmUp, warmUpCos);
  return workloads.map((w) => {
    const angles = Math.round((w.toDeg - w.fromDeg) / w.stepDeg) + 1;
    const cosT = Float64Array.from({ length: angles }, (_, i) => Math.cos(((w.fromDeg + w.stepDeg * i) * Math.PI) / 180));
    const out = allocateAmplitudes(angles);
    const runs = w.x > 20000 ? 5 : 9;
    const coefficients = timeIt(() => mieCoefficients(w.mRe, w.mIm, w.x).aRe[0], { runs });
    const c = mieCoefficients(w.mRe, w.mIm, w.x);
    const kernel = timeIt(() => mieAmplitudes(c, cosT, out).s1Re[angles >> 1], { runs });
    const scalar = timeIt(() => mieAmplitudesScalar(c, cosT, out).s1Re[angles >> 1], { runs });
    const work = c.nTerms * angles;
    return {
      workload: w,
      nTerms: c.nTerms,
      angles,
      coefficientsMs: coefficients.medianMs,
      amplitudesMs: kernel.medianMs,
      scalarMs: scalar.medianMs,
      termAnglesPerSecond: work / (kernel.medianMs / 1000),
      scalarTermAnglesPerSecond: work / (scalar.medianMs / 1000),
    };
  });
}

export const mieKernelName = simdAmplitudesAvailable ? "WebAssembly SIMD" : "scalar TypeScript (no WebAssembly SIMD here)";
