// How far a Lorenz–Mie row interpolated from a sub-lattice (lib/bow/mie-sub-lattice.ts) strays from the row computed
// at every lattice point: the measurement behind SUB_LATTICE_PERIOD_FRACTION and SUB_LATTICE_POINTS.
// Per size parameter x: max over ψ 20–60° (Θ 120–160°) and both polarisations of |interpolated − direct| divided by
// the direct row's peak there, on the 0.05° lattice, m = 1.333 (and 1.333 + 1e-8 i for an absorbing drop).
// node dist/bench/mie-sub-lattice.js

import { pathToFileURL } from "node:url";
import { mieCoefficients } from "../lib/mie/coefficients.js";
import { mieAmplitudes } from "../lib/mie/amplitudes.js";
import { mieTermCount } from "../lib/mie/termCount.js";
import {
  interpolateSubLattice,
  kaiserSincWeights,
  subLatticeFactor,
  subLatticeNodes,
  SUB_LATTICE_KAISER_BETA,
  SUB_LATTICE_PERIOD_FRACTION,
  SUB_LATTICE_POINTS,
} from "../lib/bow/mie-sub-lattice.js";

const H_DEG = 0.05;
/** The bow window ψ 20–60° as lattice indices. */
const LO = Math.round(20 / H_DEG);
const HI = Math.round(60 / H_DEG);

function squaredRows(mRe: number, mIm: number, x: number, cosTheta: Float64Array): [Float64Array, Float64Array] {
  const a = mieAmplitudes(mieCoefficients(mRe, mIm, x), cosTheta);
  return [a.s1Re.map((v, j) => v * v + a.s1Im[j] * a.s1Im[j]), a.s2Re.map((v, j) => v * v + a.s2Im[j] * a.s2Im[j])];
}

/**
 * Lagrange weights (Abramowitz & Stegun 1964 eq. 25.2.2), the alternative measured against the Kaiser-windowed sinc, for a value at fraction r/c between sub-lattice nodes 0 and 1,
 * from the nodes −points/2+1 … points/2: row r (0 < r < c) holds the points weights; row 0 is unused (a node itself).
 */
export function lagrangeWeights(c: number, points: number): Float64Array {
  const w = new Float64Array(c * points);
  const first = 1 - points / 2;
  for (let r = 1; r < c; r++) {
    const t = r / c;
    for (let k = 0; k < points; k++) {
      let num = 1;
      let den = 1;
      for (let m = 0; m < points; m++) {
        if (m === k) continue;
        num *= t - (first + m);
        den *= k - m;
      }
      w[r * points + k] = num / den;
    }
  }
  return w;
}


const cosAtIndex = (i: number, h: number) => Math.cos(((180 - i * h) * Math.PI) / 180);

/** Worst error relative to the peak, over both polarisations, of the sub-lattice row with factor c and the given points. */
export function subLatticeError(x: number, c: number, points: number, mIm = 0, beta = 0, mRe = 1.333): number {
  const direct = squaredRows(mRe, mIm, x, Float64Array.from({ length: HI - LO + 1 }, (_, j) => cosAtIndex(HI - j, H_DEG)));
  const { qLo, qHi } = subLatticeNodes(LO, HI, c, points);
  const coarse = squaredRows(mRe, mIm, x, Float64Array.from({ length: qHi - qLo + 1 }, (_, k) => cosAtIndex((qLo + k) * c, H_DEG)));
  const weights = beta > 0 ? kaiserSincWeights(c, points, beta) : lagrangeWeights(c, points);
  let worst = 0;
  const out = [new Float64Array(HI - LO + 1), new Float64Array(HI - LO + 1)];
  interpolateSubLattice(coarse[0], coarse[1], qLo, c, weights, LO, HI, out[0], out[1], points);
  for (let pol = 0; pol < 2; pol++) {
    const peak = Math.max(...direct[pol]);
    for (let j = 0; j < out[pol].length; j++) worst = Math.max(worst, Math.abs(out[pol][j] - direct[pol][j]) / peak);
  }
  return worst;
}

/** Size parameters from 20 up to where the sub-lattice step at the given fraction falls to the lattice step. */
export function sizesToTest(fraction: number): number[] {
  const out: number[] = [];
  for (let x = 20; subLatticeFactor(mieTermCount(x), H_DEG, fraction) >= 2; x *= 1.07) out.push(x);
  return out;
}

export interface SubLatticeErrorRow {
  fraction: number;
  points: number;
  /** Worst error over every x tested, relative to the row's peak; and where. */
  worst: number;
  worstAtX: number;
  /** Term-angles spent over those of the direct rows, summed over the x tested (sizes evenly spaced in ln x). */
  workShare: number;
}

export function benchSubLattice(fractions: number[], pointsList: number[], mIm = 0, beta = 0): SubLatticeErrorRow[] {
  const rows: SubLatticeErrorRow[] = [];
  for (const fraction of fractions) {
    const sizes = sizesToTest(fraction);
    for (const points of pointsList) {
      let worst = 0;
      let worstAtX = 0;
      let spent = 0;
      let direct = 0;
      for (const x of sizes) {
        const c = subLatticeFactor(mieTermCount(x), H_DEG, fraction);
        const e = subLatticeError(x, c, points, mIm, beta);
        if (e > worst) [worst, worstAtX] = [e, x];
        const { qLo, qHi } = subLatticeNodes(LO, HI, c, points);
        // Term-angles: N per angle.
        spent += mieTermCount(x) * (qHi - qLo + 1);
        direct += mieTermCount(x) * (HI - LO + 1);
      }
      rows.push({ fraction, points, worst, worstAtX, workShare: spent / direct });
    }
  }
  return rows;
}

/** Interpolants compared: Lagrange (beta 0) and Kaiser-windowed sinc, with the service's choice last. */
const INTERPOLANTS = [
  { label: "Lagrange", points: 8, beta: 0 },
  { label: "Lagrange", points: 24, beta: 0 },
  { label: "Kaiser sinc β 14", points: 32, beta: 14 },
  { label: `Kaiser sinc β ${SUB_LATTICE_KAISER_BETA} (service)`, points: SUB_LATTICE_POINTS, beta: SUB_LATTICE_KAISER_BETA },
];

function main(): void {
  const fractions = [0.25, SUB_LATTICE_PERIOD_FRACTION, 0.45];
  for (const [label, mIm] of [["m = 1.333", 0], ["m = 1.333 + 1e-8 i", 1e-8]] as const) {
    console.log(`\n${label}, ψ 20–60°, lattice 0.05°, x from 20 up to where the step falls to the lattice's: worst |interpolated − direct| / peak`);
    console.log("| fraction of 180°/N | interpolant | points | worst error | at x | term-angles left |");
    console.log("|---|---|---|---|---|---|");
    for (const f of fractions) {
      for (const it of INTERPOLANTS) {
        const [r] = benchSubLattice([f], [it.points], mIm, it.beta);
        console.log(`| ${f} | ${it.label} | ${it.points} | ${r.worst.toExponential(2)} | ${r.worstAtX.toFixed(0)} | ${(100 * r.workShare).toFixed(0)} % |`);
      }
    }
  }
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) main();
