// node dist/bench/in-plane-rays.js [radiusUm] [uFrom] [uTo]: the light of the primary's order (two chords) that a
// flattened drop sends into one scattering plane, from the service's sweep (lib/rays/plane-sweep.ts: for each pupil
// abscissa u, the one offset v*(u) whose ray leaves in the plane, followed from sample to sample) against brute force:
// every ray of a grid over the pupil strip u ∈ [uFrom, uTo], |v| ≤ 1.1 traced, those leaving within |Y| < δ of the
// plane binned by Θ, each carrying its power × du·dv, over 2δ × the bin (power per unit Θ and unit Y, the sweep's
// units: |A|²/|∂(Θ,Y)/∂(u,v)| summed over rays, van de Hulst 1957 §12.22). Equilibrium shape, upright, sun 10°, side of
// the bow, n 1.3338. The brute force sees every branch of v*(u); the sweep one. A diagnostic for issue 13, not a timing.

import { shapedPlaneSweeps, shapedPlaneTracer } from "../lib/bow/shaped-plane-rows.js";
import { bowScatteringPlane, cantedAxis } from "../lib/rays/bow-geometry.js";
import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { planeRayBins } from "../lib/bow/plane-ray-bins.js";
import { AT, ORDER_STRIDE } from "../lib/rays/shape-tracer.js";

const DEG = Math.PI / 180;
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
const outside = Uint8Array.from(sweep.u, (u, s) => (u >= uFrom && s + 1 < sweep.u.length && sweep.u[s + 1] <= uTo ? 0 : 1));
const swept = planeRayBins(sweep, 1, bins, BIN_DEG, outside);

const tracer = shapedPlaneTracer(setup, plane, options);
const { dIn, e } = plane;
const normal = tracer.normal;
const brute = new Float64Array(BINS);
for (let u = uFrom + DU / 2; u < uTo; u += DU) {
  for (let v = -V_REACH; v < V_REACH; v += DV) {
    if (!tracer.traceAt(u, v, ORDER)) continue;
    const rec = tracer.lastTrace.orders;
    const base = ORDER * ORDER_STRIDE;
    const d = [rec[base + AT.dir], rec[base + AT.dir + 1], rec[base + AT.dir + 2]];
    const y = d[0] * normal[0] + d[1] * normal[1] + d[2] * normal[2];
    if (Math.abs(y) >= DELTA) continue;
    const thetaDeg = Math.atan2(d[0] * e[0] + d[1] * e[1] + d[2] * e[2], d[0] * dIn[0] + d[1] * dIn[1] + d[2] * dIn[2]) / DEG;
    const j = Math.floor((thetaDeg - FROM_DEG) / BIN_DEG);
    if (j < 0 || j >= BINS) continue;
    // Both incident polarisations' outgoing fields (the sweep's ⟂ + ∥, co- and cross-polar).
    let power = 0;
    for (const at of [AT.e1Re, AT.e1Im, AT.e2Re, AT.e2Im]) for (let c = 0; c < 3; c++) power += rec[base + at + c] ** 2;
    brute[j] += (power * DU * DV) / (2 * DELTA * BIN_DEG * DEG);
  }
}

console.log(`${radiusUm} µm equilibrium drop, side of the bow, sun 10°, order ${ORDER}, u in [${uFrom}, ${uTo}]: power per unit Θ and Y`);
console.log("| Θ (°) | sweep | brute force |");
console.log("|---|---|---|");
for (let j = 0; j < BINS; j += 2) {
  const s = swept.perpendicular[j] + swept.parallel[j];
  if (s > 0 || brute[j] > 0) console.log(`| ${bins[j].toFixed(2)} | ${s.toExponential(2)} | ${brute[j].toExponential(2)} |`);
}
