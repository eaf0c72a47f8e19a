// Lorenz–Mie rows of small drops on a coarser sub-lattice, interpolated onto the kernel lattice.
//
// S1, S2 of a drop with N partial waves are sums of π_n(cos Θ), τ_n(cos Θ), n ≤ N: polynomials of degree ≤ N in cos Θ
// (Bohren & Huffman 1983 eqs 4.46–4.47), so |S1|², |S2|² are cosine polynomials of degree ≤ 2N in Θ: band-limited,
// shortest period 360°/(2N) = 180°/N. Where that period is many lattice steps long (fog drops, N ≈ 60–400, against
// the 0.05° lattice), the row is computed on every c-th lattice point only and interpolated in between. The
// sub-lattice points are the lattice indices that are multiples of c, so a row's value at a lattice point depends
// on the drop and the point alone, never on which span a task covered (cache packs merge rows of different spans).

import { mieTermCount } from "../mie/termCount.js";

/**
 * Sub-lattice step as a fraction of the shortest period 180°/N of |S|²: 0.4, i.e. 2.5 samples per period of the
 * highest harmonic (the sampling theorem asks for more than 2). Measured (bench/mie-sub-lattice.ts, ψ 20–60°, 0.05°
 * lattice, x = 20–660, m = 1.333 and 1.333 + 1e-8 i): with the interpolant below the worst error is 2.4e-8 of the
 * row's peak; an 8-point Lagrange interpolant errs by 2e-2 at this step (6e-4 at 0.25, and 2e-7 with 24 points at 0.25).
 */
export const SUB_LATTICE_PERIOD_FRACTION = 0.4;
/** Points (taps) of the interpolant, as many on each side of the interval, and its Kaiser window's β (measured, as above). */
export const SUB_LATTICE_POINTS = 40;
export const SUB_LATTICE_KAISER_BETA = 18;

/** How the Lorenz–Mie rows are sampled: "adaptive" (a sub-lattice for small drops) or "lattice" (every point, as before). */
export type MieSampling = "adaptive" | "lattice";

/** The sub-lattice factor c ≥ 1 for a drop of N partial waves on a lattice of step hDeg: the step c·h ≤ fraction·180°/N. */
export function subLatticeFactor(nTerms: number, hDeg: number, fraction: number = SUB_LATTICE_PERIOD_FRACTION): number {
  return Math.max(1, Math.floor((fraction * 180) / nTerms / hDeg + 1e-9));
}

/** c for the largest size parameter of a drop (the largest sub-size of a cell average). */
export function subLatticeFactorForSize(xMax: number, hDeg: number, sampling: MieSampling = "adaptive"): number {
  return sampling === "lattice" ? 1 : subLatticeFactor(mieTermCount(xMax), hDeg);
}

/** I₀(z) by its power series Σ ((z/2)^k / k!)² (Abramowitz & Stegun 1964 eq. 9.6.10); z ≤ 30 here. */
function besselI0(z: number): number {
  let term = 1;
  let sum = 1;
  for (let k = 1; term > 1e-17 * sum; k++) {
    term *= (z / (2 * k)) ** 2;
    sum += term;
  }
  return sum;
}

/**
 * Kaiser-windowed sinc weights (Kaiser 1974, window I₀(β√(1−u²))/I₀(β); see Oppenheim & Schafer 2010 §7.5.3), the
 * interpolant for band-limited samples: for a value at fraction r/c between sub-lattice nodes 0 and 1, from the nodes
 * −points/2+1 … points/2, row r (0 < r < c) holds the points weights (row 0 is unused: a node itself). Each row is
 * divided by its sum, so that a constant is kept exactly.
 */
export function kaiserSincWeights(c: number, points: number, beta: number): Float64Array {
  const w = new Float64Array(c * points);
  const first = 1 - points / 2;
  const half = points / 2;
  for (let r = 1; r < c; r++) {
    const t = r / c;
    let total = 0;
    for (let k = 0; k < points; k++) {
      const d = t - (first + k);
      const u = d / half;
      const sinc = Math.sin(Math.PI * d) / (Math.PI * d);
      const v = sinc * (Math.abs(u) < 1 ? besselI0(beta * Math.sqrt(1 - u * u)) / besselI0(beta) : 0);
      w[r * points + k] = v;
      total += v;
    }
    for (let k = 0; k < points; k++) w[r * points + k] /= total;
  }
  return w;
}

const weightsByFactor = new Map<number, Float64Array>();

/** The service's interpolation weights for factor c (computed once per c). */
export function subLatticeWeights(c: number): Float64Array {
  let w = weightsByFactor.get(c);
  if (!w) weightsByFactor.set(c, (w = kaiserSincWeights(c, SUB_LATTICE_POINTS, SUB_LATTICE_KAISER_BETA)));
  return w;
}

/** The sub-lattice nodes q (lattice index q·c) an interpolation onto lattice indices lo..hi reads: qLo..qHi. */
export function subLatticeNodes(lo: number, hi: number, c: number, points: number = SUB_LATTICE_POINTS): { qLo: number; qHi: number } {
  return { qLo: Math.floor(lo / c) + 1 - points / 2, qHi: Math.floor(hi / c) + points / 2 };
}

/**
 * Values on lattice indices hi, hi−1, …, lo (Θ ascending: out[j] at index hi − j) of two rows (β⊥ and β∥ share the
 * weights) from their values on the sub-lattice nodes qLo..qHi (coarse[q − qLo] at lattice index q·c). Nodes
 * themselves are copied; |S|² is never negative, so an interpolated value below zero (a deep minimum) is set to zero.
 */
export function interpolateSubLattice(
  coarseA: Float64Array,
  coarseB: Float64Array,
  qLo: number,
  c: number,
  weights: Float64Array,
  lo: number,
  hi: number,
  outA: Float64Array,
  outB: Float64Array,
  points: number = SUB_LATTICE_POINTS,
): void {
  const before = points / 2 - 1;
  // Residue by residue, so that one row of weights serves a run of outputs.
  for (let r = 0; r < c; r++) {
    const first = lo + ((((r - lo) % c) + c) % c);
    const wr = r * points;
    for (let i = first; i <= hi; i += c) {
      const q = (i - r) / c;
      const j = hi - i;
      if (r === 0) {
        outA[j] = coarseA[q - qLo];
        outB[j] = coarseB[q - qLo];
        continue;
      }
      const base = q - before - qLo;
      let a = 0;
      let b = 0;
      for (let k = 0; k < points; k++) {
        const w = weights[wr + k];
        a += w * coarseA[base + k];
        b += w * coarseB[base + k];
      }
      outA[j] = a > 0 ? a : 0;
      outB[j] = b > 0 ? b : 0;
    }
  }
}
