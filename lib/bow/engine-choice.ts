// Which single-drop engine serves which drop radius under method "auto".

import type { DropEngine } from "./volume-scattering.js";
import { mieTermCount } from "../mie/termCount.js";
import { cellSampleRadiusUm, type CellAverage } from "./cell-average.js";

export type ProfileMethod = "auto" | "mie" | "airy" | "geometric";

/**
 * Under "auto" no drop below this radius goes to Airy theory (uniform caustic form for the bows p = 2–6, ray optics
 * for p = 0, 1); above it, Lorenz–Mie as far as AUTO_MIE_BUDGET_TERM_ANGLES reaches (chooseAutoEngine). Measured with bench/auto-engine.ts (test/lib/bow/engine-choice.test.ts
 * re-checks 110 µm) against Mie for lognormal drops, σg = 1.1 and 1.2, D65 sun, after the sun's disc, ψ 30–60°:
 * from 100 µm up to 1 mm the mean CIEDE2000 error over ψ is ≤ 0.82 and ≤ 0.38 at both bows; at 60 µm the mean is
 * 1.07–1.19. ΔE ≤ 1 at every angle is reached at no radius: the worst sample stays at 1.2–2.0 (inner edge of
 * Alexander's band, whose light from the near-grazing fifth-order bow ray optics understates, and the primary's
 * supernumeraries). Monodisperse drops differ more (mean 1.2–2.1, worst 5.5–8.4 from 100 µm), as fringes of one
 * size survive the disc.
 */
export const AUTO_AIRY_FROM_RADIUS_UM = 100;

/** Each engine's error against Lorenz–Mie as measured (see AUTO_AIRY_FROM_RADIUS_UM), for the response's meta. */
export function estimatedEngineError(engine: DropEngine, fromUm: number): string {
  if (engine === "mie") return "exact Lorenz–Mie (reference: Wiscombe 1979 test cases to 5e-6)";
  if (engine === "airy") {
    return fromUm >= AUTO_AIRY_FROM_RADIUS_UM
      ? "measured against Mie from 100 µm (narrow size distributions): mean ΔE2000 ≤ 0.82, ≤ 0.38 at the bows, worst sample ≤ 2.0"
      : "below 100 µm not within ΔE2000 1 of Mie (mean 1.1–2.5 at 20–60 µm): use auto or mie";
  }
  return "ray optics: no supernumeraries or diffraction; not measured against Mie";
}

/**
 * Mie term-angles "auto" spends on exact Lorenz–Mie before it hands large drops to Airy theory (~0.6 s of two
 * workers at the many-drops kernel's rate in BENCHMARKS.md). With AUTO_MAX_AIRY_SHARE, the least budget measured to
 * keep every preset within the accuracy goal (worst ΔE2000 ≤ 1.0, mean ≤ 0.3;
 * bench/auto-presets.ts): by the budget alone the default profile (Mie below 255 µm) gave worst 0.81, mean 0.287;
 * the downpour needs 3.41e9 (0.94), which the share rule reaches within AUTO_SHARE_COST_FACTOR.
 * A constant, so a request's result is the same on every server.
 */
export const AUTO_MIE_BUDGET_TERM_ANGLES = 1.5e9;

/**
 * The largest share of the drops' geometric cross-section (Σ w r², the bow's light) "auto" leaves to Airy theory:
 * where the budget's switch would leave more, Mie goes on to the radius that leaves this share, past the budget, as
 * Airy's error grows with the light it carries. Measured with bench/auto-presets.ts on the 25 mm/h downpour, Airy
 * from 437 µm (73 % of the cross-section): worst ΔE2000 1.07; from 505 µm (66 %) 1.02; from 562 µm (60 %) 0.94.
 */
export const AUTO_MAX_AIRY_SHARE = 0.6;

/**
 * How far past the budget the share rule may take the Mie work: 2.5 times the budget, 3.75e9 term-angles, which is
 * also the service's default synchronous limit for a profile (MAX_PROFILE_TERM_ANGLES, pipeline/config/config.ts,
 * derived from this), so that auto never turns a request the budget alone kept synchronous into a 422 (one drop size
 * carries all its cross-section, and sky views ask for wide angle ranges). The 25 mm/h downpour needs 2.3 times
 * (3.41e9, Airy from 562 µm) to stay within ΔE2000 1.0; at 2 times (Airy from 505 µm) its worst sample was 1.02.
 */
export const AUTO_SHARE_COST_FACTOR = 2.5;

/**
 * auto against full Lorenz–Mie on the service's presets and its default profile at AUTO_MIE_BUDGET_TERM_ANGLES and
 * AUTO_MAX_AIRY_SHARE (bench/auto-presets.ts; fixtures/auto-engine/presets-vs-mie.json): CIEDE2000 per sample over
 * ψ 30–60°, XYZ scaled by the Mie peak Y, the largest worst and mean over the presets, rounded up.
 */
export const AUTO_MEASURED_ON_PRESETS = { worstDeltaE: 0.95, meanDeltaE: 0.24 } as const;

export interface AutoChoice {
  /** Drops at or above this radius go to Airy theory; Infinity: every drop by Lorenz–Mie. */
  airyFromUm: number;
  rule: string;
}

/**
 * Cost-aware "auto": every drop by exact Lorenz–Mie when that costs at most the budget (Mie term-angles, one size per
 * radius node); otherwise Mie below the largest node radius whose Mie drops fit the budget, moved up while the drops
 * from there on carry more than maxAiryShare of the cross-section (while the Mie work stays within
 * AUTO_SHARE_COST_FACTOR times the budget), Airy theory from there; never Airy below
 * AUTO_AIRY_FROM_RADIUS_UM, where it strays from Mie. nodeCost[i]: the Mie term-angles of node radiiUm[i] (radii
 * ascending); nodeCrossSection[i]: its w r² (any unit); maxAiryShare 1 leaves the budget alone in charge (answers
 * whose rows share one budget, whose cost the share rule would multiply by the row count).
 */
export function chooseAutoEngine(
  radiiUm: Float64Array,
  nodeCost: ArrayLike<number>,
  nodeCrossSection: ArrayLike<number>,
  budgetTermAngles = AUTO_MIE_BUDGET_TERM_ANGLES,
  maxAiryShare = AUTO_MAX_AIRY_SHARE,
): AutoChoice {
  // below[i]: the Mie cost of the nodes below radiiUm[i]; fromHere[i]: the cross-section of node i and those above.
  const below = new Float64Array(radiiUm.length + 1);
  for (let i = 0; i < radiiUm.length; i++) below[i + 1] = below[i] + nodeCost[i];
  const fromHere = new Float64Array(radiiUm.length + 1);
  for (let i = radiiUm.length - 1; i >= 0; i--) fromHere[i] = fromHere[i + 1] + nodeCrossSection[i];
  const all = below[radiiUm.length];
  const budget = `${budgetTermAngles.toExponential(1)} Mie term-angles`;
  if (all <= budgetTermAngles) {
    return { airyFromUm: Infinity, rule: `auto: exact Lorenz–Mie for every drop (${all.toExponential(2)} Mie term-angles, within the budget of ${budget})` };
  }
  let airyFromUm = AUTO_AIRY_FROM_RADIUS_UM;
  radiiUm.forEach((r, i) => {
    if (r > airyFromUm && below[i] <= budgetTermAngles) airyFromUm = r;
  });
  const byBudget = airyFromUm;
  // The first node at or above the budget's switch from which on Airy carries at most the share, or whose Mie work
  // would pass the ceiling (none: all Mie); the budget's switch stays where its first Airy node already does.
  const ceiling = AUTO_SHARE_COST_FACTOR * budgetTermAngles;
  const first = radiiUm.findIndex((r, i) => r >= byBudget && (fromHere[i] <= maxAiryShare * fromHere[0] || below[i + 1] > ceiling));
  if (first !== radiiUm.findIndex((r) => r >= byBudget)) airyFromUm = first < 0 ? Infinity : radiiUm[first];
  const measured = `measured against full Mie on the presets (ψ 30–60°): worst ΔE2000 ${AUTO_MEASURED_ON_PRESETS.worstDeltaE}, mean ≤ ${AUTO_MEASURED_ON_PRESETS.meanDeltaE}`;
  const share = `${(100 * maxAiryShare).toFixed(0)} % of the drops' cross-section`;
  const mieCost = first < 0 ? all : below[first];
  const airyShare = first < 0 ? 0 : fromHere[first] / fromHere[0];
  const past = `past the budget's ${byBudget.toFixed(0)} µm`;
  const why =
    airyFromUm === byBudget
      ? `the largest radius within the budget, never below ${AUTO_AIRY_FROM_RADIUS_UM} µm`
      : airyShare <= maxAiryShare
        ? `${past}, so that Airy theory serves at most ${share}: ${mieCost.toExponential(2)} Mie term-angles`
        : `${past}, as far as ${AUTO_SHARE_COST_FACTOR} times the budget reaches: Airy theory still serves ${(100 * airyShare).toFixed(0)} % of the drops' cross-section`;
  return {
    airyFromUm,
    rule:
      `auto: exact Lorenz–Mie for every drop would cost ${all.toExponential(2)} Mie term-angles, above the budget of ${budget}; ` +
      (Number.isFinite(airyFromUm) ? `Mie below ${airyFromUm.toFixed(0)} µm (${why}), Airy theory from there; ` : `Mie for every drop (${why}); `) +
      measured,
  };
}

/** The engine of each radius under a cost-aware auto choice. */
export function autoEngine(choice: AutoChoice): (radiusUm: number) => DropEngine {
  return (r) => (r < choice.airyFromUm ? "mie" : "airy");
}

/** The engine per radius; "auto" here is the fixed switch at AUTO_AIRY_FROM_RADIUS_UM (profiles use chooseAutoEngine). */
export function engineChooser(method: ProfileMethod): (radiusUm: number) => DropEngine {
  switch (method) {
    case "mie":
      return () => "mie";
    case "airy":
      return () => "airy";
    case "geometric":
      return () => "geometric";
    case "auto":
      return (r) => (r < AUTO_AIRY_FROM_RADIUS_UM ? "mie" : "airy");
  }
}

/**
 * Mie terms × angles a profile would cost: Σ over Mie radii (each size of a cell average) and wavelengths, counted at
 * every lattice point. Small drops' rows are computed on a sub-lattice (mie-sub-lattice.ts) and cost less (fog P2:
 * 6.7e8 spent against 2.5e9 counted); the count is left as it was so that auto's choices, the radius density and the
 * synchronous limit stay where they were measured.
 */
export function estimateMieTermAngles(
  radiiUm: Float64Array,
  wavelengthsNm: Float64Array,
  internalAngles: number,
  engine: (radiusUm: number) => DropEngine,
  averages: readonly (CellAverage | undefined)[] = [],
): number {
  // Terms summed, then multiplied by the angles once: the same integer (exact below 2^53). A running total of
  // term-angles passes 2^31 on a fog request after rain ones stayed below it, and V8 threw away the compiled loop
  // (small-integer overflow) in the middle of planning.
  let terms = 0;
  radiiUm.forEach((r, i) => {
    if (engine(r) !== "mie") return;
    const average = averages[i];
    const samples = average && average.samples > 1 ? average.samples : 1;
    for (let s = 0; s < samples; s++) {
      const radiusUm = samples === 1 ? r : cellSampleRadiusUm(r, average!, s);
      for (const w of wavelengthsNm) terms += mieTermCount((2 * Math.PI * radiusUm * 1000) / w);
    }
  });
  return terms * internalAngles;
}
