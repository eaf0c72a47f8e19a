// node dist/bench/in-plane-rays.js [radiusUm] [uFrom] [uTo]: the light of the primary's order (two chords) that a
// flattened drop sends into one scattering plane, from the service's sweep (lib/rays/plane-sweep.ts: for each pupil
// abscissa u, the one offset v*(u) whose ray leaves in the plane, followed from sample to sample) against brute force
// over the pupil strip u ∈ [uFrom, uTo] (bench/in-plane-brute.ts). Equilibrium shape, upright, sun 10°, side of
// the bow, n 1.3338. The brute force sees every root of v*(u); the sweep follows one, and its branches
// (lib/rays/fold-back.ts) the others beyond its folds. A diagnostic for issue 13, not a timing.

import { shapedPlaneSweeps } from "../lib/bow/shaped-plane-rows.js";
import { bowScatteringPlane, cantedAxis } from "../lib/rays/bow-geometry.js";
import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { bruteForceInPlane, sweptInPlane } from "./in-plane-brute.js";

const ORDER = 2;
const N = 1.3338;
const [radiusUm = 1500, uFrom = -1.06, uTo = -0.9] = process.argv.slice(2).map(Number);
/** Grid steps in the pupil (units of a) and the slab's half-width in Y: bins of 0.25° get ~10⁴ rays each. */
const DU = 2e-4;
const DV = 5e-4;
const DELTA = 0.003;
const V_REACH = 1.1;
const BIN_DEG = 0.25;
const FROM_DEG = 130;
const BINS = 120;

const plane = bowScatteringPlane(10, 90);
const setup = { outline: equilibriumOutline(radiusUm), axis: cantedAxis(0, 0), n: N };
const bins = Float64Array.from({ length: BINS }, (_, j) => FROM_DEG + BIN_DEG * (j + 0.5));
const options = { rayOrders: [], bowOrders: [ORDER] };

// The sweep as the service traces it (on a grid of ψ 20–70° at 0.05°), its samples within the strip.
const serviceGrid = Float64Array.from({ length: 1015 }, (_, j) => 109.7 + 0.05 * j);
const sweep = shapedPlaneSweeps([setup], plane, 1, serviceGrid, 0.05, options)[0][ORDER]!;
const swept = sweptInPlane(sweep, uFrom, uTo, FROM_DEG, BIN_DEG, BINS, false);
// With the roots beyond folds of v*(u) (lib/rays/fold-back.ts) and the bridges across those folds.
const branched = sweptInPlane(sweep, uFrom, uTo, FROM_DEG, BIN_DEG, BINS, true);

const brute = bruteForceInPlane(setup, plane, ORDER, { uFrom, uTo, vReach: V_REACH, du: DU, dv: DV, delta: DELTA }, FROM_DEG, BIN_DEG, BINS);

console.log(`${radiusUm} µm equilibrium drop, side of the bow, sun 10°, order ${ORDER}, u in [${uFrom}, ${uTo}]: power per unit Θ and Y`);
console.log("| Θ (°) | sweep's own root | with the roots beyond its folds | brute force |");
console.log("|---|---|---|---|");
for (let j = 0; j < BINS; j += 2) {
  if (swept[j] > 0 || branched[j] > 0 || brute[j] > 0) console.log(`| ${bins[j].toFixed(2)} | ${swept[j].toExponential(2)} | ${branched[j].toExponential(2)} | ${brute[j].toExponential(2)} |`);
}
