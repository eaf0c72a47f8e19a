// node dist/bench/piece-ends.js [radiusUm …]: where the two pieces of a flattened drop's primary bow end in one traced
// scattering plane (issue 13's diagnostics, not a timing). For each radius (equilibrium shape, upright, sun 10°, side of
// the bow, n 1.3338) and for a sphere: the fold's angle, and for each piece its last traced sample (pupil abscissa u,
// Θ) and the power per unit u over its last samples (PlaneSweep.perpPerU + parPerU). A piece that reaches the drop's rim
// ends at grazing entry, where the Fresnel transmission and so the power fall to 0 (Born & Wolf 1999 §1.5.3, from
// memory) and Θ is the grazing ray's; a piece whose power climbs to its last sample ends where the in-plane ray's
// offset v*(u) folds (∂Y/∂v → 0, the power per unit u growing as its inverse), or where the search loses the ray as
// ∂Y/∂v falls; at a fold the other root of v*(u) leaves in the plane too, which lib/rays/fold-back.ts traces as a
// branch of the sweep (PlaneSweep.branches). Output of a run is in issue 13's notes (stop 29).

import { shapedPlaneSweeps } from "../lib/bow/shaped-plane-rows.js";
import { bowScatteringPlane, cantedAxis } from "../lib/rays/bow-geometry.js";
import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { bowFold } from "../lib/bow/plane-bow-table.js";
import type { PlaneSweep } from "../lib/rays/plane-sweep.js";

const DEG = Math.PI / 180;
/** A sphere to the tracer (lib/drops/shape/shape-nodes.ts: node 0). */
const SPHERE_RADIUS_UM = 0.5;
const N = 1.3338;
const SUN_DEG = 10;
const ARC_DEG = 90;
/** Θ 109.7–160.4° at 0.05°: a profile's ψ 20–70°, wider than the default ψ 30–60° so that piece ends inside the bow show. */
const THETA_DEG = Float64Array.from({ length: 1015 }, (_, j) => 109.7 + 0.05 * j);
const TAIL = 4;
/** lib/bow/shaped-plane-rows.ts LOOK_MARGIN_DEG: a sweep stops where its light is this far past the grid. */
const LOOK_MARGIN_DEG = 10;
/** Power per u growing by more than this from the second-last sample to the last: climbing. */
const CLIMB = 1.05;

function pieceEnd(sweep: PlaneSweep, last: number, towards: 1 | -1): string {
  const power = (s: number) => sweep.perpPerU[s] + sweep.parPerU[s];
  const tail = Array.from({ length: TAIL }, (_, k) => last - towards * (TAIL - 1 - k)).map((s) => power(s).toExponential(2));
  const thetaDeg = sweep.thetaSigned[last] / DEG;
  const how =
    thetaDeg > THETA_DEG[THETA_DEG.length - 1] + LOOK_MARGIN_DEG
      ? "past the grid's look margin: the sweep stops there"
      : power(last) > CLIMB * power(last - towards)
        ? "climbing: a fold of v*(u)"
        : "not climbing";
  return `u ${sweep.u[last].toFixed(5)}, Θ ${thetaDeg.toFixed(2)}°, power per u over the last ${TAIL} samples ${tail.join(", ")} (${how})`;
}

const radii = process.argv.slice(2).map(Number);
for (const radiusUm of [SPHERE_RADIUS_UM, ...(radii.length ? radii : [1000, 1500, 2000])]) {
  const plane = bowScatteringPlane(SUN_DEG, ARC_DEG);
  const [sweeps] = shapedPlaneSweeps([{ outline: equilibriumOutline(radiusUm), axis: cantedAxis(0, 0), n: N }], plane, 1, THETA_DEG, 0.05, { rayOrders: [], bowOrders: [2] });
  const sweep = sweeps[2];
  const fold = sweep ? bowFold(N, sweep, 1) : null;
  const name = radiusUm === SPHERE_RADIUS_UM ? "sphere" : `${radiusUm} µm equilibrium drop`;
  if (!sweep || !fold) {
    console.log(`${name}: no primary fold in this plane`);
    continue;
  }
  console.log(`${name}: fold Θ_R ${(fold.thetaR / DEG).toFixed(3)}°`);
  console.log(`  inner piece ends at ${pieceEnd(sweep, fold.inner[0], -1)}`);
  console.log(`  outer piece ends at ${pieceEnd(sweep, fold.outer[1], 1)}`);
}
