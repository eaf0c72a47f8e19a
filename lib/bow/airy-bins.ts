// The bows of order p = 2, 3 by the uniform approximation for a fold caustic (Chester, Friedman & Ursell 1957,
// Proc. Camb. Phil. Soc. 53, 599; for the rainbow Berry & Mount 1972, Rep. Prog. Phys. 35, 315, §5 (section from
// memory)). With the two rays of one order at Θ, signed amplitudes a₁, a₂ and phase difference Δφ = (4/3)z^{3/2}:
//   |S_j|² = π[(a₁ + a₂)² z^{1/2} Ai²(−z) + (a₁ − a₂)² z^{−1/2} Ai′²(−z)].
// It equals Airy theory at the bow and ray optics with interference far from it, so it needs no handover; the
// Ai′² term carries the parallel field, whose amplitude changes sign across the bow near Brewster's angle.
// On the dark side the amplitudes are expanded to first order in b − b_R, A(b) ≈ A₀ + A₁(b − b_R), which gives
// the same form with z = ξ: |S_j|² = C_j Ai²(−ξ) + D_j Ai′²(−ξ) (C_j as in lib/rays/airy-bow.ts; D_j below).
// Bins are averaged exactly over z linear across each bin: ∫Ai² = z·Ai² − Ai′² and
// ∫Ai′² = (−z²·Ai² + z·Ai′² + 2·Ai·Ai′)/3, both by differentiation with Ai″ = z·Ai (Abramowitz & Stegun 1964 Eq. 10.4.1).

import { airyPair } from "../special/airy.js";
import { airyBowScale } from "../rays/airy-bow.js";
import { deviationCurvature, deviationSlope, rainbowImpactParameter } from "../rays/descartes.js";
import { raysAtScatteringAngle } from "../rays/geometric-intensity.js";

const DEG = Math.PI / 180;
/** Relative step of the central difference for dA/db at the rainbow ray (common practice: ~ε^{1/3} of the scale). */
const SLOPE_STEP = 1e-5;

/** Size-independent part of one bow on one angle grid: z = x^{2/3}·ẑ, U_j = x^{7/3}·u_j, V_j = x^{5/3}·v_j. */
export interface UniformBowTable {
  /** ẑ at the nBins + 1 bin edges; negative on the dark side. */
  zHatEdges: Float64Array;
  uPerp: Float64Array;
  uPar: Float64Array;
  vPerp: Float64Array;
  vPar: Float64Array;
  /** 1 where a bin is served by the uniform formula; 0 where only one ray of the order reaches it (ray optics). */
  uniform: Uint8Array;
}

/**
 * Signed field amplitudes t·r^k·t′ of a ray of order k at impact parameter b (Fresnel, Born & Wolf 1999 §1.5.2
 * Eq. 20–21; internal r′ = −r by Stokes' relations), times √b for the ring's width.
 */
function signedAmplitude(n: number, k: number, b: number): { perpendicular: number; parallel: number } {
  const cosI = Math.sqrt(1 - b * b);
  const nCosR = Math.sqrt(n * n - b * b);
  const cosR = nCosR / n;
  const rPerp = (cosI - nCosR) / (cosI + nCosR);
  const rPar = (n * cosI - cosR) / (n * cosI + cosR);
  // t·t′ = 1 − r² for both polarisations (Stokes' relations).
  const root = Math.sqrt(b);
  return {
    perpendicular: root * (1 - rPerp * rPerp) * (-rPerp) ** k,
    parallel: root * (1 - rPar * rPar) * (-rPar) ** k,
  };
}

/** G(b) = 2(p·n·cos r − cos i), p = k + 1: x·G is a ray's optical phase, and d(xG)/dΘ = ±x·b (van de Hulst 1957 §12.32, from memory). */
function pathPhase(n: number, k: number, b: number): number {
  return 2 * ((k + 1) * Math.sqrt(n * n - b * b) - Math.sqrt(1 - b * b));
}

interface RayPair {
  inner: number;
  outer: number;
}

/** The two rays of order k at Θ on either side of the rainbow ray; null where fewer than two reach Θ. */
function rayPair(n: number, k: number, bRainbow: number, thetaRad: number): RayPair | null {
  let inner = NaN;
  let outer = NaN;
  for (const b of raysAtScatteringAngle(n, k, thetaRad)) {
    if (b < bRainbow) inner = b;
    else outer = b;
  }
  return Number.isNaN(inner) || Number.isNaN(outer) ? null : { inner, outer };
}

/** ẑ = (3|ΔG|/4)^{2/3} of a ray pair, so that Δφ = x·|ΔG| = (4/3)z^{3/2}. */
function zHatOfPair(n: number, k: number, pair: RayPair): number {
  return Math.cbrt(0.75 * Math.abs(pathPhase(n, k, pair.inner) - pathPhase(n, k, pair.outer))) ** 2;
}

/** Precomputes the bow of order p (chords) on bins of width stepDeg centred on thetaDeg, for real index n. */
export function uniformBowTable(n: number, p: number, thetaDeg: Float64Array, stepDeg: number): UniformBowTable {
  const k = p - 1;
  const bR = rainbowImpactParameter(n, k);
  if (bR === null) throw new RangeError(`no bow of order ${p} for n = ${n}`);
  const count = thetaDeg.length;
  const scale = airyBowScale(n, 1, k);
  const curvature = deviationCurvature(n, k, bR);
  const sinR = Math.sin(scale.rainbowAngleDeg * DEG);
  // Dark side: D_j = 4π·2^{1/3}·A₁_j²/(D″^{4/3}·sinΘ_R), from the first-order amplitude in the Airy integral.
  const up = signedAmplitude(n, k, bR * (1 + SLOPE_STEP));
  const down = signedAmplitude(n, k, bR * (1 - SLOPE_STEP));
  const slopeFactor = (4 * Math.PI * 2 ** (1 / 3)) / (curvature ** (4 / 3) * sinR);
  const dPerp = slopeFactor * ((up.perpendicular - down.perpendicular) / (2 * bR * SLOPE_STEP)) ** 2;
  const dPar = slopeFactor * ((up.parallel - down.parallel) / (2 * bR * SLOPE_STEP)) ** 2;

  const zHatAt = (thetaAtDeg: number): { zHat: number; pair: RayPair | null; single: boolean } => {
    const xi = scale.xiPerRad * (thetaAtDeg - scale.rainbowAngleDeg) * DEG;
    if (xi <= 0) return { zHat: xi, pair: null, single: false };
    const pair = rayPair(n, k, bR, thetaAtDeg * DEG);
    return pair ? { zHat: zHatOfPair(n, k, pair), pair, single: false } : { zHat: NaN, pair: null, single: true };
  };

  const zHatEdges = new Float64Array(count + 1);
  const singleEdge = new Uint8Array(count + 1);
  for (let e = 0; e <= count; e++) {
    const at = zHatAt((e < count ? thetaDeg[e] : thetaDeg[count - 1] + stepDeg) - stepDeg / 2);
    zHatEdges[e] = at.zHat;
    singleEdge[e] = at.single ? 1 : 0;
  }
  const uPerp = new Float64Array(count);
  const uPar = new Float64Array(count);
  const vPerp = new Float64Array(count);
  const vPar = new Float64Array(count);
  const uniform = new Uint8Array(count);
  for (let j = 0; j < count; j++) {
    const centre = zHatAt(thetaDeg[j]);
    if (centre.single || singleEdge[j] || singleEdge[j + 1]) continue;
    uniform[j] = 1;
    if (centre.pair === null) {
      uPerp[j] = scale.perpendicularScale;
      uPar[j] = scale.parallelScale;
      vPerp[j] = dPerp;
      vPar[j] = dPar;
      continue;
    }
    // Ray amplitudes over x: a_i/x = A(b_i)/√(|dD/db|·sinΘ) (van de Hulst 1957 §12.22 divergence factor).
    const sinTheta = Math.sin(thetaDeg[j] * DEG);
    const z = centre.zHat;
    const [a1, a2] = [centre.pair.inner, centre.pair.outer].map((b) => {
      const amp = signedAmplitude(n, k, b);
      const spread = 1 / Math.sqrt(Math.abs(deviationSlope(n, k, b)) * sinTheta);
      return { perpendicular: amp.perpendicular * spread, parallel: amp.parallel * spread };
    });
    uPerp[j] = Math.PI * (a1.perpendicular + a2.perpendicular) ** 2 * Math.sqrt(z);
    uPar[j] = Math.PI * (a1.parallel + a2.parallel) ** 2 * Math.sqrt(z);
    vPerp[j] = (Math.PI * (a1.perpendicular - a2.perpendicular) ** 2) / Math.sqrt(z);
    vPar[j] = (Math.PI * (a1.parallel - a2.parallel) ** 2) / Math.sqrt(z);
  }
  return { zHatEdges, uPerp, uPar, vPerp, vPar, uniform };
}

function aiSquaredIntegral(w: number): number {
  const { ai, aiPrime } = airyPair(w);
  return w * ai * ai - aiPrime * aiPrime;
}

function aiPrimeSquaredIntegral(w: number): number {
  const { ai, aiPrime } = airyPair(w);
  return (-w * w * ai * ai + w * aiPrime * aiPrime + 2 * ai * aiPrime) / 3;
}

/**
 * Adds weight × (bin mean of |S1|², |S2|²) of the bow in `table` for size parameter x to perp/par, on the bins
 * the table marks uniform; the others are left to the caller (ray optics of the same order).
 */
export function addUniformBowBins(
  table: UniformBowTable,
  x: number,
  weight: number,
  perpendicular: Float64Array,
  parallel: Float64Array,
): void {
  const zScale = x ** (2 / 3);
  const uScale = weight * x ** (7 / 3);
  const vScale = weight * x ** (5 / 3);
  const edges = table.zHatEdges;
  let wPrev = -zScale * edges[0];
  let fPrev = Number.isFinite(wPrev) ? aiSquaredIntegral(wPrev) : NaN;
  let gPrev = Number.isFinite(wPrev) ? aiPrimeSquaredIntegral(wPrev) : NaN;
  for (let j = 0; j < perpendicular.length; j++) {
    const w = -zScale * edges[j + 1];
    const finite = Number.isFinite(w);
    const f = finite ? aiSquaredIntegral(w) : NaN;
    const g = finite ? aiPrimeSquaredIntegral(w) : NaN;
    if (table.uniform[j]) {
      let meanAi2: number;
      let meanAiPrime2: number;
      if (Math.abs(w - wPrev) > 1e-9) {
        // Mean over the bin of Ai²(w), w = −z from wPrev to w.
        meanAi2 = (f - fPrev) / (w - wPrev);
        meanAiPrime2 = (g - gPrev) / (w - wPrev);
      } else {
        const { ai, aiPrime } = airyPair(0.5 * (w + wPrev));
        meanAi2 = ai * ai;
        meanAiPrime2 = aiPrime * aiPrime;
      }
      perpendicular[j] += uScale * table.uPerp[j] * meanAi2 + vScale * table.vPerp[j] * meanAiPrime2;
      parallel[j] += uScale * table.uPar[j] * meanAi2 + vScale * table.vPar[j] * meanAiPrime2;
    }
    wPrev = w;
    fPrev = f;
    gPrev = g;
  }
}
