// npm run bench:canting [-- --write]: the canting mean of flattened drops' bows (lib/bow/canting-spread.ts: each of
// the five nodes' bows spread over the folds of its cell of tilts) and the five nodes' rows added as they are, each against two
// canting integrals taken by brute force: over the pupil, every ray of the upright drop traced with the sun at each
// elevation relative to the axis and weighted by the tilt density of the arc it leaves at (bench/canting-pupil.ts: no
// sweep enters it; ray optics), and on a dense grid of tilts (TILT_SPACING_DEG apart over ±TILT_SPAN_SD σ in both planes,
// Gaussian weights), every tilt's plane swept on its own (ray optics with the Airy-type bows). One wavelength (550 nm,
// n 1.3345), after the sun's disc (Neckel & Labs 1994 limb darkening, as profiles), ψ 30–58°. Writes the canting-spread
// section of BENCHMARKS.md with --write.

import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { loadavg } from "node:os";
import { BANDED_FROM_RADIUS_UM, shapedRows, type CantingMean, type ShapedRowSpec } from "../lib/bow/shaped-rows.js";
import { shapedPlaneContext, shapedPlaneRow } from "../lib/bow/shaped-plane-rows.js";
import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { bowScatteringPlane, cantedAxis } from "../lib/rays/bow-geometry.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { errors, N_RE, PUPIL_GRID, pupilReference, SD_DEG, seen, sizeParameter, STEP_DEG, SUN_DEG, THETA_DEG } from "./canting-setup.js";

/**
 * Tilts 1° apart: a node's fold then moves by ≤ 0.5° (1 mm drops half-way up the bow, ≤ 0.5° per degree of tilt), inside
 * the sun's disc (a grid 1.5° apart left a comb in the reference: worst errors 0.4 of the peak where the summed error
 * stayed 0.06); over ±3.5σ, leaving out exp(−3.5²/2) = 0.2 % of the tilts' weight (the means spread over ±5σ).
 */
const TILT_SPACING_DEG = 1;
const TILT_SPAN_SD = 3.5;

const CASES = process.env.CASES ? JSON.parse(process.env.CASES) : [
  { radiusUm: 500, arcPositionDeg: 45 },
  { radiusUm: 1000, arcPositionDeg: 0 },
  { radiusUm: 1000, arcPositionDeg: 45 },
  { radiusUm: 1000, arcPositionDeg: 90 },
  { radiusUm: 1500, arcPositionDeg: 0 },
  { radiusUm: 1500, arcPositionDeg: 45 },
  { radiusUm: 1500, arcPositionDeg: 90 },
  { radiusUm: 2000, arcPositionDeg: 0 },
  { radiusUm: 2000, arcPositionDeg: 10 },
  { radiusUm: 2000, arcPositionDeg: 90 },
];

function bruteForce(radiusUm: number, arcPositionDeg: number, x: number): Float64Array {
  const outline = equilibriumOutline(radiusUm);
  const plane = bowScatteringPlane(SUN_DEG, arcPositionDeg);
  const sum = { perp: new Float64Array(THETA_DEG.length), par: new Float64Array(THETA_DEG.length) };
  const perp = new Float64Array(THETA_DEG.length);
  const par = new Float64Array(THETA_DEG.length);
  const m = Math.round((TILT_SPAN_SD * SD_DEG) / TILT_SPACING_DEG);
  let total = 0;
  for (let i = -m; i <= m; i++) {
    for (let k = -m; k <= m; k++) {
      const [tx, ty] = [i * TILT_SPACING_DEG, k * TILT_SPACING_DEG];
      const w = Math.exp(-(tx * tx + ty * ty) / (2 * SD_DEG * SD_DEG));
      shapedPlaneRow(shapedPlaneContext({ outline, axis: cantedAxis(tx, ty), n: N_RE }, plane, 1, THETA_DEG, STEP_DEG), x, perp, par);
      for (let j = 0; j < perp.length; j++) {
        sum.perp[j] += w * perp[j];
        sum.par[j] += w * par[j];
      }
      total += w;
    }
  }
  return seen(sum.perp.map((v) => v / total), sum.par.map((v) => v / total));
}

const rows: string[] = [];
for (const { radiusUm, arcPositionDeg } of CASES) {
  const x = sizeParameter(radiusUm);
  // The service's rule for the size: the banded one near a mirror plane above BANDED_FROM_RADIUS_UM.
  const spec: ShapedRowSpec = { kind: "equilibrium", cantingSdDeg: SD_DEG, sunElevationDeg: SUN_DEG, arcPositionDeg, rayOnly: false, traceEveryIndex: true, cantingBand: radiusUm > BANDED_FROM_RADIUS_UM };
  const drop = { radiusUm, mRe: N_RE, x };
  const mean = (how: CantingMean) => {
    const [row] = shapedRows(spec, [drop], THETA_DEG, STEP_DEG, how);
    return seen(row.perp, row.par);
  };
  const reference = bruteForce(radiusUm, arcPositionDeg, x);
  const pupil = pupilReference(radiusUm, arcPositionDeg);
  const means = { spread: mean("spread"), nodes: mean("nodes") };
  const figures = [...(["spread", "nodes"] as const).map((how) => errors(means[how], pupil)), errors(reference, pupil), ...(["spread", "nodes"] as const).map((how) => errors(means[how], reference))];
  // DUMP=<folder>: the rows themselves, for a look at where they part (Θ, both references, spread, nodes).
  if (process.env.DUMP) {
    const rowsOf = { thetaDeg: Array.from(THETA_DEG), pupil: Array.from(pupil), reference: Array.from(reference), spread: Array.from(means.spread), nodes: Array.from(means.nodes) };
    writeFileSync(join(process.env.DUMP, `canting-${radiusUm}-${arcPositionDeg}.json`), JSON.stringify(rowsOf));
  }
  const line = `| ${radiusUm / 1000} mm, arc ${arcPositionDeg}° | ${figures.map((f) => `${f.worst.toFixed(3)} / ${f.summed.toFixed(3)}`).join(" | ")} |`;
  console.log(line);
  rows.push(line);
}

const lines = [
  "## Flattened drops: the canting mean against brute force",
  "",
  `Written by \`npm run bench:canting -- --write\` (bench/canting-spread.ts), ${benchDate()}; ${machineLine()}; load average ${loadavg()[0].toFixed(1)} at the end.`,
  `Equilibrium drops, canting σ ${SD_DEG}°, sun 10°, 550 nm, after the sun's disc, ψ 30–58°. Errors as a share of the reference's peak (worst) and`,
  "summed |Δ| over the summed reference. Pupil (the first reference): brute force over the upright drop's pupil, each ray weighted",
  `by the density of the tilts that send it to the place on the bow (rotation invariance; bench/canting-pupil.ts; pupil step ${PUPIL_GRID.du},`,
  `relative sun elevations ${PUPIL_GRID.elevationStepDeg}° apart over ±${PUPIL_GRID.spanSd}σ; ray optics). Tilt grid (the second): every tilt of a grid ${TILT_SPACING_DEG}° apart over`,
  `±${TILT_SPAN_SD}σ in both planes swept on its own, Gaussian weights (Airy-type bows). Spread (the service's): each canting node's bow spread`,
  "over the folds of its own cell of tilts (lib/bow/canting-spread.ts, the fold quadratic through the five nodes' folds; above",
  `${BANDED_FROM_RADIUS_UM / 1000} mm radius within 2.5σ of tilt of the top or foot the banded rule, lib/bow/canting-band-spread.ts); nodes: the rule's rows added with its weights.`,
  "",
  "| drops, place on the bow | spread vs pupil | nodes vs pupil | tilt grid vs pupil | spread vs tilt grid | nodes vs tilt grid |",
  "|---|---|---|---|---|---|",
  ...rows,
];
if (process.argv.includes("--write")) writeMarkedSection("canting-spread", lines);
else console.log(lines.join("\n"));
