// How many drop sizes per decade of radius the Lorenz–Mie rows of a profile need (cell-average.ts turns them into
// a mean per 64-per-decade node). A single drop's Lorenz–Mie scattering ripples in size
// parameter x = 2πr/λ with a quasi-period below one (resonance spacing ≈ arctan(√(m²−1))/√(m²−1) ≈ 0.82 at
// m = 1.333: Chýlek 1976, J. Opt. Soc. Am. 66, 285, from memory); a size distribution averages the ripple away only
// when its sizes are closer than that in x. Rain's light comes from drops the Airy engine serves, whose rows do not
// ripple, so 64 per decade converge (ΔE2000 0.05–0.1, test/pipeline/compute/profile-convergence.test.ts); fog's do not.

import type { DropEngine } from "./volume-scattering.js";
import type { RadiusQuadrature } from "../drops/quadrature.js";

/** Sizes per decade a request may use: multiples of the 64-per-decade node lattice (DEFAULT_NODES_PER_DECADE). */
export const RADIUS_DENSITIES = [64, 128, 256, 512, 1024] as const;
export type RadiusDensity = (typeof RADIUS_DENSITIES)[number];

/** The finest density "auto" picks; 1024 is for those who ask (measured ΔE2000 0.2 against 2048 for fog, below). */
export const AUTO_MAX_DENSITY = 512;

/**
 * Largest x step between neighbouring Mie sizes that "auto" accepts. Measured with plain lattice nodes at each
 * density (fog, lognormal 10 µm σg 1.4, full Mie, ψ 20–60° by 0.2°, 380–780 nm by 10 nm; worst ΔE2000 against 2048
 * nodes per decade, x at the cross-section median radius and 550 nm): Δx 4.5 → 2.4, 1.1 → 1.6, 0.57 → 0.72,
 * 0.28 → 0.20. test/pipeline/compute/mie-ripple-convergence.test.ts measures the cell means against dense nodes.
 */
export const MAX_RIPPLE_STEP_X = 0.6;

/** Below this share of the geometric cross-section in Mie-served drops, the ripple cannot move the colours much. */
export const MIE_SHARE_FOR_RIPPLE = 0.5;

/**
 * Largest size parameter (at the Mie drops' cross-section median) for which "auto" averages: measured up to x 643
 * (lognormal 40 µm σg 1.6: worst ΔE2000 1.17 with one size per node, 0.46 with 256 sizes, against 1024). Larger Mie
 * drops (rain forced to Lorenz–Mie) were not measured; their many nodes and wavelengths already dilute the ripple.
 */
export const MAX_AVERAGED_X = 1000;

/** Wavelength (nm) at which "auto" evaluates x: the middle of the visible, where the eye weighs colour most. */
const RIPPLE_WAVELENGTH_NM = 550;

export interface DensityChoice {
  sizesPerDecade: RadiusDensity;
  /** Why this density, in words for the response's metadata. */
  rule: string;
  /** Set when the ripple wants more than auto gave (budget or AUTO_MAX_DENSITY): the density to ask for instead. */
  cappedFrom?: RadiusDensity;
}

/** Share of Σ w r² carried by nodes the Mie engine serves, and the cross-section median radius among them. */
export function mieCrossSection(q: RadiusQuadrature, engine: (radiusUm: number) => DropEngine): { share: number; medianRadiusUm: number } {
  let total = 0;
  let mie = 0;
  for (let i = 0; i < q.radiiUm.length; i++) {
    const c = q.weights[i] * q.radiiUm[i] * q.radiiUm[i];
    total += c;
    if (engine(q.radiiUm[i]) === "mie") mie += c;
  }
  let below = 0;
  let medianRadiusUm = 0;
  for (let i = 0; i < q.radiiUm.length && mie > 0; i++) {
    if (engine(q.radiiUm[i]) !== "mie") continue;
    below += q.weights[i] * q.radiiUm[i] * q.radiiUm[i];
    if (below >= mie / 2) {
      medianRadiusUm = q.radiiUm[i];
      break;
    }
  }
  return { share: total > 0 ? mie / total : 0, medianRadiusUm };
}

/** Density whose neighbouring nodes differ by at most MAX_RIPPLE_STEP_X at x (the nearest lattice density in log). */
export function rippleDensity(x: number): RadiusDensity {
  const wanted = (x * Math.LN10) / MAX_RIPPLE_STEP_X;
  let best: RadiusDensity = RADIUS_DENSITIES[0];
  for (const d of RADIUS_DENSITIES) if (d <= AUTO_MAX_DENSITY && Math.abs(Math.log(d / wanted)) < Math.abs(Math.log(best / wanted))) best = d;
  return best;
}

/**
 * The "auto" density: 64 per decade unless Mie-served drops carry at least half the cross-section; then the
 * density that averages their ripple at their cross-section median radius, lowered while the Mie work it would
 * take (cost(density), term-angles) exceeds the interactive budget.
 */
export function chooseRadiusDensity(options: {
  base: RadiusQuadrature;
  engine: (radiusUm: number) => DropEngine;
  nAir: number;
  cost: (density: RadiusDensity) => number;
  budgetTermAngles: number;
}): DensityChoice {
  const { base, engine, nAir, cost, budgetTermAngles } = options;
  const { share, medianRadiusUm } = mieCrossSection(base, engine);
  if (base.radiiUm.length <= 1) return { sizesPerDecade: 64, rule: "auto: one drop size, nothing to average" };
  if (share < MIE_SHARE_FOR_RIPPLE) {
    return { sizesPerDecade: 64, rule: `auto: 64 sizes per decade (Mie-served drops carry ${(100 * share).toFixed(1)} % of the cross-section, too little for their ripple to matter)` };
  }
  const x = (2 * Math.PI * medianRadiusUm * nAir * 1000) / RIPPLE_WAVELENGTH_NM;
  if (x > MAX_AVERAGED_X) {
    return { sizesPerDecade: 64, rule: `auto: 64 sizes per decade (the Mie drops' cross-section median, ${medianRadiusUm.toFixed(0)} µm, is at x ${x.toFixed(0)}, above the ${MAX_AVERAGED_X} up to which averaging was measured; set mieSizesPerDecade to average anyway)` };
  }
  const wanted = rippleDensity(x);
  let chosen: RadiusDensity = wanted;
  while (chosen > 64 && cost(chosen) > budgetTermAngles) chosen = (chosen / 2) as RadiusDensity;
  const at = `at the Mie drops' cross-section median (${medianRadiusUm.toFixed(1)} µm, x ${x.toFixed(0)} at 550 nm)`;
  const stepX = (d: number) => (x * Math.LN10) / d;
  // The nearest density in log is within a factor √2 of the one the step asks for.
  const averages = (d: number) => stepX(d) <= Math.SQRT2 * MAX_RIPPLE_STEP_X;
  if (chosen === wanted && averages(chosen)) {
    return { sizesPerDecade: chosen, rule: `auto: ${chosen} Lorenz–Mie sizes per decade, ${stepX(chosen).toFixed(2)} apart in size parameter ${at}: enough to average the Mie ripple` };
  }
  const enough = RADIUS_DENSITIES.find(averages) ?? RADIUS_DENSITIES[RADIUS_DENSITIES.length - 1];
  const limit = chosen < wanted ? "the interactive budget" : `auto's limit of ${AUTO_MAX_DENSITY}`;
  return {
    sizesPerDecade: chosen,
    cappedFrom: Math.max(enough, chosen * 2) as RadiusDensity,
    rule: `auto: ${chosen} Lorenz–Mie sizes per decade, ${stepX(chosen).toFixed(2)} apart in size parameter ${at}; averaging the Mie ripple wants ≤ ${MAX_RIPPLE_STEP_X}, beyond ${limit}`,
  };
}
