// Geometric-optics scattered intensity of one ray order, in the dimensionless convention of the Mie amplitudes
// (Bohren & Huffman 1983 §3.4: dσ/dΩ = |S|²/k²). A ray tube of area a²·b·db·dφ spreads over sinΘ·dΘ·dφ, so
// |S_j|² = x²·ε_j²·b·|db/dΘ| / |sin Θ| (van de Hulst 1957 §12.22 divergence factor, section from memory).
// Rays reaching the same Θ are added incoherently: no interference, no diffraction, infinite at the bow.

import {
  deviationRad,
  deviationSlope,
  rainbowImpactParameter,
  scatteringAngleOfDeviation,
} from "./descartes.js";
import { pathTransmittance } from "./fresnel.js";

export interface PolarisedIntensity {
  /** |S1|², field perpendicular to the scattering plane. */
  perpendicular: Float64Array;
  /** |S2|², field parallel to the scattering plane. */
  parallel: Float64Array;
}

const DEG = Math.PI / 180;
// Halving [0, 1] 64 times pins b to the last bit of a double.
const BISECTION_STEPS = 64;
// Below this impact parameter b/sinΘ is replaced by its limit 1/|dD/db| (D(0) is a multiple of π for every order).
const AXIAL_IMPACT_PARAMETER = 1e-6;

interface Branch {
  bLow: number;
  bHigh: number;
  dLow: number;
  dHigh: number;
}

function monotoneBranches(n: number, k: number): Branch[] {
  const bRainbow = rainbowImpactParameter(n, k);
  const edges = bRainbow === null ? [0, 1] : [0, bRainbow, 1];
  const branches: Branch[] = [];
  for (let j = 0; j + 1 < edges.length; j++) {
    branches.push({
      bLow: edges[j],
      bHigh: edges[j + 1],
      dLow: deviationRad(n, k, edges[j]),
      dHigh: deviationRad(n, k, edges[j + 1]),
    });
  }
  return branches;
}

function solveOnBranch(n: number, k: number, branch: Branch, target: number): number {
  let lo = branch.bLow;
  let hi = branch.bHigh;
  const rising = branch.dHigh > branch.dLow;
  for (let step = 0; step < BISECTION_STEPS; step++) {
    const mid = 0.5 * (lo + hi);
    const below = deviationRad(n, k, mid) < target;
    if (below === rising) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** 1 − 1e-9: cos i ≈ 4.5e-5, where sin Θ and dΘ/db of grazing rays are still accurate in double precision. */
const GRAZING_IMPACT_PARAMETER = 1 - 1e-9;

/** Impact parameters of all rays of order k leaving at scattering angle Θ (radians). */
export function raysAtScatteringAngle(n: number, k: number, scatteringAngle: number): number[] {
  const found: number[] = [];
  const twoPi = 2 * Math.PI;
  for (const branch of monotoneBranches(n, k)) {
    const dMin = Math.min(branch.dLow, branch.dHigh);
    const dMax = Math.max(branch.dLow, branch.dHigh);
    const mLow = Math.floor((dMin - Math.PI) / twoPi);
    const mHigh = Math.ceil((dMax + Math.PI) / twoPi);
    // A Set: at Θ = 0 or π the targets 2πm ± Θ of neighbouring m coincide.
    const targets = new Set<number>();
    for (let m = mLow; m <= mHigh; m++) {
      for (const target of [twoPi * m + scatteringAngle, twoPi * m - scatteringAngle]) {
        if (target >= dMin && target <= dMax) targets.add(target);
      }
    }
    for (const target of targets) found.push(solveOnBranch(n, k, branch, target));
  }
  return found;
}

/**
 * Geometric-optics |S1|², |S2|² of the rays with k internal reflections (k = −1: external reflection) of a sphere
 * with real relative index n and size parameter x, at each scattering angle (degrees).
 */
export function geometricIntensity(
  n: number,
  x: number,
  k: number,
  scatteringAngleDeg: Float64Array,
): PolarisedIntensity {
  const perpendicular = new Float64Array(scatteringAngleDeg.length);
  const parallel = new Float64Array(scatteringAngleDeg.length);
  for (let j = 0; j < scatteringAngleDeg.length; j++) {
    const theta = scatteringAngleDeg[j] * DEG;
    for (const root of raysAtScatteringAngle(n, k, theta)) {
      // At grazing incidence (b → 1) both sin Θ and 1/|dΘ/db| vanish for the rays that leave near Θ = 0 or π;
      // their ratio stays finite, so the ray is taken a hair inside the rim where both are representable.
      const b = Math.min(root, GRAZING_IMPACT_PARAMETER);
      const slope = Math.abs(deviationSlope(n, k, b));
      const sinTheta = Math.abs(Math.sin(scatteringAngleOfDeviation(deviationRad(n, k, b)).angle));
      const bOverSin = b < AXIAL_IMPACT_PARAMETER ? 1 / slope : b / sinTheta;
      const spread = (x * x * bOverSin) / slope;
      const energy = pathTransmittance(n, k, b);
      perpendicular[j] += spread * energy.perpendicular;
      parallel[j] += spread * energy.parallel;
    }
  }
  return { perpendicular, parallel };
}
