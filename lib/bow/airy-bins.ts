// The bows of order p = 2–6 by the uniform approximation for a fold caustic (Chester, Friedman & Ursell 1957,
// Proc. Camb. Phil. Soc. 53, 599; for the rainbow Berry & Mount 1972, Rep. Prog. Phys. 35, 315, §5 (section from
// memory)). With the two rays of one order at Θ, signed amplitudes a₁, a₂ and phase difference Δφ = (4/3)z^{3/2}:
//   |S_j|² = π[(a₁ + a₂)² z^{1/2} Ai²(−z) + (a₁ − a₂)² z^{−1/2} Ai′²(−z)].
// It equals Airy theory at the bow and ray optics with interference far from it, so it needs no handover; the
// Ai′² term carries the parallel field, whose amplitude changes sign across the bow near Brewster's angle.
// On the dark side the amplitudes are expanded to first order in b − b_R, A(b) ≈ A₀ + A₁(b − b_R), which gives
// the same form with z = ξ: |S_j|² = C_j Ai²(−ξ) + D_j Ai′²(−ξ) (C_j as in lib/rays/airy-bow.ts; D_j below).
// Bins are averaged exactly over z linear across each bin: ∫Ai² = z·Ai² − Ai′² and
// ∫Ai′² = (−z²·Ai² + z·Ai′² + 2·Ai·Ai′)/3, both by differentiation with Ai″ = z·Ai (Abramowitz & Stegun 1964 Eq. 10.4.1).

import { airyFast, airyFastOut } from "./airy-table.js";
import { airyBowScale } from "../rays/airy-bow.js";
import { deviationCurvature, deviationRad, deviationSlope, rainbowImpactParameter, scatteringAngleOfDeviation } from "../rays/descartes.js";
import { fresnelAmplitudes, type PolarisedPair } from "../rays/fresnel.js";

const DEG = Math.PI / 180;
/** Relative step of the central difference for dA/db at the rainbow ray (~ε^{1/3} of the scale: Press et al. 2007, Numerical Recipes 3rd ed. §5.7). */
const SLOPE_STEP = 1e-5;

/** Size-independent part of one bow on one angle grid: z = x^{2/3}·ẑ, U_j = x^{7/3}·u_j, V_j = x^{5/3}·v_j. */
export interface UniformBowTable {
  /** ẑ at the nBins + 1 bin edges; negative on the dark side. */
  zHatEdges: Float64Array;
  uPerp: Float64Array;
  uPar: Float64Array;
  vPerp: Float64Array;
  vPar: Float64Array;
  /** |S_j|²/x² of the order's rays that take no part in the bow (ray optics), on uniform bins. */
  otherPerp: Float64Array;
  otherPar: Float64Array;
  /** 1 where a bin is served by the uniform formula; 0 where other than the bow's own pair of rays reach it (ray optics). */
  uniform: Uint8Array;
}

/**
 * Signed field amplitudes t·r^k·t′ of a ray of order k at impact parameter b (Fresnel, Born & Wolf 1999 §1.5.2
 * Eq. 20–21; internal r′ = −r by Stokes' relations), times √b for the ring's width.
 */
function signedAmplitude(n: number, k: number, b: number): PolarisedPair {
  const { perpendicular: rPerp, parallel: rPar } = fresnelAmplitudes(n, b);
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

interface RaysAtAngle {
  /** The two rays that merge at the rainbow ray, or null where they do not both reach Θ. */
  pair: RayPair | null;
  /** Further rays of the same order (high orders wrap round), added incoherently. */
  others: number[];
}

/**
 * Segments of the tabulated Θ(b); roots are then polished by Newton steps kept inside their segment (quadratic
 * convergence from a linear guess in a segment of ≤ π/2000 in b: 6 steps reach rounding error (quadratic convergence: Press et al. 2007 §9.4);
 * checked against 64-step bisection, which gave ΔE identical to 1e-8 in test/lib/bow/engine-choice.test.ts's case).
 */
const RAY_TABLE_SEGMENTS = 1000;
const NEWTON_STEPS = 6;
/** A Newton update this small relative to b (a few ulps) means the next one would be below rounding: stop. */
const NEWTON_SETTLED = 1e-14;

/**
 * All rays of order k reaching each angle of the evenly spaced grid firstDeg + m·spacingDeg (m < queries):
 * Θ(b) is tabulated on b = sin(uπ/2) (nodes crowd towards grazing, where Θ turns fastest) with b_R as a node,
 * so each segment is monotone; every grid angle a segment spans gives one root.
 */
function raysOnGrid(n: number, k: number, bRainbow: number, firstDeg: number, spacingDeg: number, queries: number): number[][] {
  const found: number[][] = Array.from({ length: queries }, () => []);
  const nodes: number[] = [];
  for (let s = 0; s <= RAY_TABLE_SEGMENTS; s++) nodes.push(Math.sin(((s / RAY_TABLE_SEGMENTS) * Math.PI) / 2));
  nodes.push(bRainbow);
  nodes.sort((x, y) => x - y);
  const dev = nodes.map((b) => deviationRad(n, k, Math.min(b, 1 - 1e-15)));
  for (let s = 0; s + 1 < nodes.length; s++) {
    const [b0, b1, d0, d1] = [nodes[s], nodes[s + 1], dev[s], dev[s + 1]];
    if (b1 <= b0) continue;
    // A segment whose deviation crosses a multiple of π folds through Θ = 0 or 180°: left out (axis and glory only).
    if (Math.floor(d0 / Math.PI) !== Math.floor(d1 / Math.PI)) continue;
    const t0 = scatteringAngleOfDeviation(d0);
    const t1 = scatteringAngleOfDeviation(d1);
    const lo = Math.min(t0.angle, t1.angle) / DEG;
    const hi = Math.max(t0.angle, t1.angle) / DEG;
    const mFirst = Math.max(0, Math.ceil((lo - firstDeg) / spacingDeg));
    const mLast = Math.min(queries - 1, Math.ceil((hi - firstDeg) / spacingDeg) - 1);
    for (let m = mFirst; m <= mLast; m++) {
      const theta = (firstDeg + m * spacingDeg) * DEG;
      const target = d0 + t0.sign * (theta - t0.angle);
      let b = b0 + ((target - d0) / (d1 - d0)) * (b1 - b0);
      for (let step = 0; step < NEWTON_STEPS; step++) {
        const slope = deviationSlope(n, k, Math.min(b, 1 - 1e-15));
        if (!Number.isFinite(slope) || slope === 0) break;
        const next = Math.min(b1, Math.max(b0, b - (deviationRad(n, k, Math.min(b, 1 - 1e-15)) - target) / slope));
        // Converged to rounding: further steps would not move b.
        const settled = Math.abs(next - b) <= NEWTON_SETTLED * b;
        b = next;
        if (settled) break;
      }
      found[m].push(b);
    }
  }
  return found;
}

/** Rays of order k at one angle, split into the bow's own pair (equal deviation, nearest b_R on either side) and the rest; dR = D(b_R). */
function splitRays(n: number, k: number, bRainbow: number, dR: number, rays: number[]): RaysAtAngle {
  let inner = -1;
  let outer = -1;
  rays.forEach((b, i) => {
    // The pair shares one deviation, within a half-turn of D_R (whose other rays differ by whole turns).
    if (Math.abs(deviationRad(n, k, b) - dR) > Math.PI) return;
    if (b < bRainbow && (inner < 0 || b > rays[inner])) inner = i;
    if (b > bRainbow && (outer < 0 || b < rays[outer])) outer = i;
  });
  if (inner < 0 || outer < 0) return { pair: null, others: rays };
  return { pair: { inner: rays[inner], outer: rays[outer] }, others: rays.filter((_, i) => i !== inner && i !== outer) };
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

  // Edges and centres interleave on a half-step grid: edge e at m = 2e, centre j at m = 2j + 1.
  const halfGridFirstDeg = thetaDeg[0] - stepDeg / 2;
  const raysByHalfStep = raysOnGrid(n, k, bR, halfGridFirstDeg, stepDeg / 2, 2 * count + 1);
  const deviationAtRainbow = deviationRad(n, k, bR);
  const zHatAt = (m: number): { zHat: number; rays: RaysAtAngle; single: boolean } => {
    const thetaAtDeg = halfGridFirstDeg + (m * stepDeg) / 2;
    const xi = scale.xiPerRad * (thetaAtDeg - scale.rainbowAngleDeg) * DEG;
    const rays = splitRays(n, k, bR, deviationAtRainbow, raysByHalfStep[m]);
    if (xi <= 0) return { zHat: xi, rays: { pair: null, others: rays.others }, single: false };
    return rays.pair ? { zHat: zHatOfPair(n, k, rays.pair), rays, single: false } : { zHat: NaN, rays, single: true };
  };

  const zHatEdges = new Float64Array(count + 1);
  const singleEdge = new Uint8Array(count + 1);
  for (let e = 0; e <= count; e++) {
    const at = zHatAt(2 * e);
    zHatEdges[e] = at.zHat;
    singleEdge[e] = at.single ? 1 : 0;
  }
  const uPerp = new Float64Array(count);
  const uPar = new Float64Array(count);
  const vPerp = new Float64Array(count);
  const vPar = new Float64Array(count);
  const otherPerp = new Float64Array(count);
  const otherPar = new Float64Array(count);
  const uniform = new Uint8Array(count);
  for (let j = 0; j < count; j++) {
    const centre = zHatAt(2 * j + 1);
    const sinTheta = Math.sin(thetaDeg[j] * DEG);
    // A bin centred on the axis (Θ = 0 or 180°) has no finite point value: the ray bins serve it.
    if (centre.single || singleEdge[j] || singleEdge[j + 1] || !(sinTheta > 0)) continue;
    uniform[j] = 1;
    // Rays that take no part in the bow: ray optics at the bin centre, |S_j|²/x² = ε_j²·b/(|dD/db|·sinΘ).
    for (const b of centre.rays.others) {
      const amp = signedAmplitude(n, k, b);
      const spread = 1 / (Math.abs(deviationSlope(n, k, b)) * sinTheta);
      otherPerp[j] += amp.perpendicular ** 2 * spread;
      otherPar[j] += amp.parallel ** 2 * spread;
    }
    const pair = centre.rays.pair;
    if (pair === null) {
      uPerp[j] = scale.perpendicularScale;
      uPar[j] = scale.parallelScale;
      vPerp[j] = dPerp;
      vPar[j] = dPar;
      continue;
    }
    // Ray amplitudes over x: a_i/x = A(b_i)/√(|dD/db|·sinΘ) (van de Hulst 1957 §12.22 divergence factor).
    const z = centre.zHat;
    const [a1, a2] = [pair.inner, pair.outer].map((b) => {
      const amp = signedAmplitude(n, k, b);
      const spread = 1 / Math.sqrt(Math.abs(deviationSlope(n, k, b)) * sinTheta);
      return { perpendicular: amp.perpendicular * spread, parallel: amp.parallel * spread };
    });
    uPerp[j] = Math.PI * (a1.perpendicular + a2.perpendicular) ** 2 * Math.sqrt(z);
    uPar[j] = Math.PI * (a1.parallel + a2.parallel) ** 2 * Math.sqrt(z);
    vPerp[j] = (Math.PI * (a1.perpendicular - a2.perpendicular) ** 2) / Math.sqrt(z);
    vPar[j] = (Math.PI * (a1.parallel - a2.parallel) ** 2) / Math.sqrt(z);
  }
  return { zHatEdges, uPerp, uPar, vPerp, vPar, otherPerp, otherPar, uniform };
}

/** Ai(w) below e^{−(4/3)·40^{3/2}} ≈ 1e-146 of Ai(0) from w = 40 on (A&S 10.4.59): the integrals are 0 there. */
const DARK_CUTOFF_W = 40;
/**
 * From this many Ai² fringes per bin (the phase (2/3)z^{3/2} advances by π per fringe) the bin means of Ai²(−z)
 * and Ai′²(−z) are their local averages 1/(2π√z) and √z/(2π) (A&S 10.4.60, 10.4.62), within ~1/(2π·10) ≈ 2 %.
 */
const INCOHERENT_FRINGES = 10;

/** Antiderivatives at w of Ai² (w·Ai² − Ai′²) and of Ai′² ((−w²·Ai² + w·Ai′² + 2·Ai·Ai′)/3), into integralsOut. */
const integralsOut = new Float64Array(2);
function squaredIntegrals(w: number): void {
  if (w >= DARK_CUTOFF_W) {
    integralsOut[0] = 0;
    integralsOut[1] = 0;
    return;
  }
  airyFast(w);
  const ai = airyFastOut[0];
  const aiPrime = airyFastOut[1];
  integralsOut[0] = w * ai * ai - aiPrime * aiPrime;
  integralsOut[1] = (-w * w * ai * ai + w * aiPrime * aiPrime + 2 * ai * aiPrime) / 3;
}

/**
 * Adds weight × (bin mean of |S1|², |S2|²) of the bow's own ray pair in `table` for size parameter x to perp/par,
 * on the bins the table marks uniform. The rest scales as x² and is left to the caller, prepared once per
 * wavelength: the order's other rays (otherPerp, otherPar) there, bin-averaged ray optics of the order elsewhere.
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
  const { zHatEdges: edges, uniform, uPerp, uPar, vPerp, vPar } = table;
  let cachedEdge = -1;
  let cachedAi2 = 0;
  let cachedAiPrime2 = 0;
  for (let j = 0; j < perpendicular.length; j++) {
    if (!uniform[j]) continue;
    const zLo = zScale * edges[j];
    const zHi = zScale * edges[j + 1];
    let meanAi2: number;
    let meanAiPrime2: number;
    const fringes = zLo > 0 && zHi > 0 ? Math.abs(zHi * Math.sqrt(zHi) - zLo * Math.sqrt(zLo)) / (1.5 * Math.PI) : 0;
    if (fringes >= INCOHERENT_FRINGES) {
      const root = Math.sqrt(0.5 * (zLo + zHi));
      meanAi2 = 1 / (2 * Math.PI * root);
      meanAiPrime2 = root / (2 * Math.PI);
    } else if (Math.abs(zHi - zLo) > 1e-9) {
      // Mean over the bin of Ai²(w), w = −z running from −zLo to −zHi.
      let loAi2: number;
      let loAiPrime2: number;
      if (cachedEdge === j) {
        loAi2 = cachedAi2;
        loAiPrime2 = cachedAiPrime2;
      } else {
        squaredIntegrals(-zLo);
        loAi2 = integralsOut[0];
        loAiPrime2 = integralsOut[1];
      }
      squaredIntegrals(-zHi);
      meanAi2 = (loAi2 - integralsOut[0]) / (zHi - zLo);
      meanAiPrime2 = (loAiPrime2 - integralsOut[1]) / (zHi - zLo);
      cachedEdge = j + 1;
      cachedAi2 = integralsOut[0];
      cachedAiPrime2 = integralsOut[1];
    } else {
      airyFast(-0.5 * (zLo + zHi));
      meanAi2 = airyFastOut[0] * airyFastOut[0];
      meanAiPrime2 = airyFastOut[1] * airyFastOut[1];
    }
    perpendicular[j] += uScale * uPerp[j] * meanAi2 + vScale * vPerp[j] * meanAiPrime2;
    parallel[j] += uScale * uPar[j] * meanAi2 + vScale * vPar[j] * meanAiPrime2;
  }
}
