import { mieCoefficients } from "../lib/mie/coefficients.js";
import { mieCoefficientsScratch } from "../lib/mie/coefficients-scratch.js";
import { mieAmplitudes, mieAmplitudesScalar } from "../lib/mie/amplitudes.js";
import { simdAmplitudesAvailable, simdArithmetic } from "../lib/mie/simd-amplitudes.js";
import { mieTermCount } from "../lib/mie/termCount.js";
import { mieAmplitudesManyDrops } from "../lib/mie/many-drops.js";
import { allocateAmplitudes } from "../lib/mie/types.js";
import { buildCompiledReference, SAME_WIDTH_FLAGS, type CompiledReference } from "./compiled-reference.js";
import { timeIt } from "./timing.js";

export interface MieWorkload {
  name: string;
  /** Size parameters of the drops computed in one pass (one for the single-drop workloads). */
  sizeParameters: number[];
  mRe: number;
  mIm: number;
  fromDeg: number;
  toDeg: number;
  stepDeg: number;
  /** Our kernel: one drop per call (mieAmplitudes) or all drops per pass (mieAmplitudesManyDrops). */
  kernel: "per call" | "many drops";
}

const single = (name: string, x: number, mIm: number, fromDeg: number, toDeg: number, stepDeg: number): MieWorkload => ({
  name,
  sizeParameters: [x],
  mRe: 1.333,
  mIm,
  fromDeg,
  toDeg,
  stepDeg,
  kernel: "per call",
});

/** Drops a profile task holds: size parameters 500–5,000 evenly in ln x (radii ~44–440 µm at 550 nm). */
export const MANY_DROPS = 48;

/**
 * Raindrops of a full-Mie rain profile's largest radii: size parameters 20,000–30,000 (1.75–2.6 mm at 550 nm), whose
 * coefficients (~19 MB packed) do not fit the caches, as in such a profile's tasks (M's fit).
 */
export const LARGE_DROPS = 16;

/**
 * W1 at three sizes over the whole half-circle; W2, W3 one drop over a bow's angles; M many drops on one lattice;
 * L large drops on the same lattice by the many-drops kernel (the per-call kernel on them is W3's case).
 */
export const mieWorkloads: MieWorkload[] = [
  ...[100, 1000, 10000].map((x) => single(`W1 x=${x}`, x, 0, 0, 180, 0.1)),
  single("W2 x=3000", 3000, 0, 120, 150, 0.01),
  single("W3 x=50000", 50000, 1e-8, 130, 145, 0.05),
  ...(["per call", "many drops"] as const).map((kernel) => ({
    name: `M ${MANY_DROPS} drops x=500–5000, ${kernel}`,
    sizeParameters: Array.from({ length: MANY_DROPS }, (_, i) => 500 * Math.exp((Math.log(10) * i) / (MANY_DROPS - 1))),
    mRe: 1.333,
    mIm: 1e-9,
    fromDeg: 115,
    toDeg: 155,
    stepDeg: 0.05,
    kernel,
  })),
  {
    name: `L ${LARGE_DROPS} drops x=20000–30000, many drops`,
    sizeParameters: Array.from({ length: LARGE_DROPS }, (_, i) => 20000 * Math.exp((Math.log(1.5) * i) / (LARGE_DROPS - 1))),
    mRe: 1.333,
    mIm: 1e-9,
    fromDeg: 115,
    toDeg: 155,
    stepDeg: 0.05,
    kernel: "many drops",
  },
];

export interface MieBenchRow {
  workload: MieWorkload;
  terms: number;
  angles: number;
  /** Ours, per pass over the workload's drops: medians over the rounds. */
  coefficientsMs: number;
  amplitudesMs: number;
  /** Partial waves × angles per second on one core in the amplitude loop. */
  termAnglesPerSecond: number;
  /** The scalar TypeScript reference kernel on the same coefficients (single-drop workloads). */
  scalar: null | { ms: number; termAnglesPerSecond: number };
  compiled: null | {
    coefficientsMs: number;
    amplitudesMs: number;
    /** Compiled time ÷ ours (≥ 1: ours is as fast): median, and the lowest and highest of the rounds. */
    speed: { median: number; low: number; high: number };
    amplitudeSpeed: number;
    coefficientSpeed: number;
    /** |Σ ours − Σ compiled| / Σ compiled of Σ |S1|² + |S2|² over drops and angles. */
    checksumRelDiff: number;
    /** The same C built for WebAssembly SIMD's instruction set (SAME_WIDTH_FLAGS): its amplitude time, and it ÷ ours. */
    sameWidth: null | { amplitudesMs: number; amplitudeSpeed: number };
  };
}

/**
 * CPU time of this process in ms (µs resolution): the machine is shared, and time on the CPU is what a loaded
 * machine disturbs least; the compiled reference reads the same clock (CLOCK_PROCESS_CPUTIME_ID).
 */
function cpuMs(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

const median = (v: number[]) => [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)];

function cosines(w: MieWorkload): Float64Array {
  const angles = Math.round((w.toDeg - w.fromDeg) / w.stepDeg) + 1;
  return Float64Array.from({ length: angles }, (_, i) => Math.cos(((w.fromDeg + w.stepDeg * i) * Math.PI) / 180));
}

/**
 * One pass of ours over the workload: coefficients, amplitudes, timed apart; the checksum of Σ|S1|²+|S2|². The
 * many-drops kernel computes coefficients as it packs them: its amplitude time is the pass less a separate
 * coefficients-only pass.
 */
function oursOnce(w: MieWorkload, cosT: Float64Array, out = allocateAmplitudes(cosT.length)): { coefficientsMs: number; amplitudesMs: number; checksum: number } {
  if (w.kernel === "many drops") {
    const t0 = cpuMs();
    for (const x of w.sizeParameters) mieCoefficientsScratch(w.mRe, w.mIm, x);
    const t1 = cpuMs();
    const outs = w.sizeParameters.map(() => out);
    mieAmplitudesManyDrops(w.sizeParameters.length, (d) => mieCoefficientsScratch(w.mRe, w.mIm, w.sizeParameters[d]), cosT, outs);
    const t2 = cpuMs();
    // Every drop wrote into the same output: the checksum comes from a pass with one output per drop.
    return { coefficientsMs: t1 - t0, amplitudesMs: t2 - t1 - (t1 - t0), checksum: manyDropsChecksum(w, cosT) };
  }
  let coefficientsMs = 0;
  let amplitudesMs = 0;
  let checksum = 0;
  for (const x of w.sizeParameters) {
    const t0 = cpuMs();
    const c = mieCoefficientsScratch(w.mRe, w.mIm, x);
    const t1 = cpuMs();
    const a = mieAmplitudes(c, cosT, out);
    const t2 = cpuMs();
    coefficientsMs += t1 - t0;
    amplitudesMs += t2 - t1;
    for (let j = 0; j < cosT.length; j++) checksum += a.s1Re[j] ** 2 + a.s1Im[j] ** 2 + a.s2Re[j] ** 2 + a.s2Im[j] ** 2;
  }
  return { coefficientsMs, amplitudesMs, checksum };
}

const checksums = new Map<MieWorkload, number>();
function manyDropsChecksum(w: MieWorkload, cosT: Float64Array): number {
  let sum = checksums.get(w);
  if (sum !== undefined) return sum;
  const outs = w.sizeParameters.map(() => allocateAmplitudes(cosT.length));
  mieAmplitudesManyDrops(w.sizeParameters.length, (d) => mieCoefficientsScratch(w.mRe, w.mIm, w.sizeParameters[d]), cosT, outs);
  sum = 0;
  for (const a of outs) for (let j = 0; j < cosT.length; j++) sum += a.s1Re[j] ** 2 + a.s1Im[j] ** 2 + a.s2Re[j] ** 2 + a.s2Im[j] ** 2;
  checksums.set(w, sum);
  return sum;
}

/**
 * Ours and the compiled reference in alternating rounds (ours, compiled, ours, …), each round the median of a few
 * passes; the figures are medians over the rounds, so that a burst of load from other processes hits both sides.
 */
export function benchMie(workloads: MieWorkload[] = mieWorkloads, rounds = 5): { rows: MieBenchRow[]; compiler: string; sameWidthCompiler: string | null } {
  // V8 runs WebAssembly from its baseline compiler until the function has run a while: warm it up first, as a
  // running service has, so that the first row is not the only one timed on baseline code.
  const warmUp = mieCoefficients(1.333, 0, 3000);
  const warmUpCos = Float64Array.from({ length: 800 }, (_, i) => Math.cos(((115 + 0.05 * i) * Math.PI) / 180));
  for (let i = 0; i < 5; i++) mieAmplitudes(warmUp, warmUpCos);
  const reference = buildCompiledReference();
  const compiledRef: CompiledReference | null = "missing" in reference ? null : reference;
  const narrow = compiledRef && buildCompiledReference(SAME_WIDTH_FLAGS);
  const sameWidthRef: CompiledReference | null = narrow && !("missing" in narrow) ? narrow : null;
  const rows = workloads.map((w): MieBenchRow => {
    const cosT = cosines(w);
    const angles = cosT.length;
    const terms = w.sizeParameters.reduce((sum, x) => sum + mieTermCount(x), 0);
    const passes = 3;
    const ours: { coefficientsMs: number; amplitudesMs: number }[] = [];
    const compiled: { coefficientsMs: number; amplitudesMs: number }[] = [];
    const sameWidth: number[] = [];
    const speeds: number[] = [];
    let checksum = 0;
    let compiledChecksum = 0;
    oursOnce(w, cosT);
    for (let r = 0; r < rounds; r++) {
      const passesOurs = Array.from({ length: passes }, () => oursOnce(w, cosT));
      checksum = passesOurs[0].checksum;
      const o = { coefficientsMs: median(passesOurs.map((p) => p.coefficientsMs)), amplitudesMs: median(passesOurs.map((p) => p.amplitudesMs)) };
      ours.push(o);
      if (compiledRef) {
        const c = compiledRef.run({ ...w, reps: passes });
        compiledChecksum = c.checksum;
        compiled.push(c);
        speeds.push(c.totalMs / (o.coefficientsMs + o.amplitudesMs));
      }
      if (sameWidthRef) sameWidth.push(sameWidthRef.run({ ...w, reps: passes }).amplitudesMs);
    }
    const coefficientsMs = median(ours.map((o) => o.coefficientsMs));
    const amplitudesMs = median(ours.map((o) => o.amplitudesMs));
    // The scalar kernel is the reference for exactness, not a contender: timed on the single drops only.
    const one = w.sizeParameters.length === 1 ? mieCoefficients(w.mRe, w.mIm, w.sizeParameters[0]) : null;
    const scalar = one && timeIt(() => mieAmplitudesScalar(one, cosT).s1Re[angles >> 1], { runs: 3 });
    const cCoefficientsMs = median(compiled.map((c) => c.coefficientsMs));
    const cAmplitudesMs = median(compiled.map((c) => c.amplitudesMs));
    return {
      workload: w,
      terms,
      angles,
      coefficientsMs,
      amplitudesMs,
      termAnglesPerSecond: (terms * angles) / (amplitudesMs / 1000),
      scalar: scalar && { ms: scalar.medianMs, termAnglesPerSecond: (terms * angles) / (scalar.medianMs / 1000) },
      compiled: compiledRef
        ? {
            coefficientsMs: cCoefficientsMs,
            amplitudesMs: cAmplitudesMs,
            speed: { median: median(speeds), low: Math.min(...speeds), high: Math.max(...speeds) },
            amplitudeSpeed: cAmplitudesMs / amplitudesMs,
            coefficientSpeed: cCoefficientsMs / coefficientsMs,
            checksumRelDiff: Math.abs(checksum - compiledChecksum) / compiledChecksum,
            sameWidth: sameWidthRef ? { amplitudesMs: median(sameWidth), amplitudeSpeed: median(sameWidth) / amplitudesMs } : null,
          }
        : null,
    };
  });
  return { rows, compiler: compiledRef ? compiledRef.compiler : (reference as { missing: string }).missing, sameWidthCompiler: sameWidthRef?.compiler ?? null };
}

export const mieKernelName = simdAmplitudesAvailable
  ? `WebAssembly SIMD, ${simdArithmetic === "fused" ? "fused multiply-add (relaxed SIMD)" : "exact arithmetic (no relaxed SIMD here)"}`
  : "scalar TypeScript (no WebAssembly SIMD here)";
