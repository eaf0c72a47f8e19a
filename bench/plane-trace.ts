// node dist/bench/plane-trace.js [--against <dist root of another build>] [--label <what that build is>] [--rounds N]
// [--p4] [--write] (--write: the plane-trace section of BENCHMARKS.md): what one traced
// scattering plane of a flattened drop costs (issue 13), in CPU time and in rays traced through the drop, and how far
// its rows move, this build beside another one in the same process (alternating rounds, CPU-time medians: the
// machine is shared). The other build is any checkout's `npm run build` output (e.g. main's, copied aside): its
// modules are imported from there, so both run in one process on the same inputs.
// Measured: one plane of P4's drop (1 mm equilibrium drop, top of the bow, sun as P4's request, 600 bins
// over ψ 30–60°, upright and canted across the plane as P4's canting nodes 0 and 3) traced at one index (ShapedRowSpec.traceEveryIndex), its rows at that wavelength; with --p4 also P4
// itself (canting 7.5°, 5 canting nodes × (7 traced + 41 interpolated) planes, lib/bow/shaped-rows.ts shapedRows) and
// 2 mm drops at arc 45°, whose spectral rows are also compared in colour: CIEDE2000 per angle (Luo, Cui & Rigg 2001,
// via bench/auto-presets.ts xyzDeltaE) on CIE 1931 XYZ of an equal-energy spectrum, scaled by the other build's
// peak Y, and the angles of the primary's and secondary's peaks of Y (parabola through the largest bin and its
// neighbours).
// Traces are counted by wrapping PlaneTracer.prototype.traceAt in a separate, untimed pass.

import { pathToFileURL } from "node:url";
import { resolve } from "node:path";
import { loadavg } from "node:os";
import { median } from "./stats.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { xyzDeltaE } from "./auto-presets.js";
import { spectraToXyz } from "../lib/colour/tristimulus.js";
import { P4 } from "./profiles.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { latticeRadiusQuadrature } from "../lib/drops/lattice-quadrature.js";
import { toDistribution } from "../pipeline/compute/profile.js";
import { planDropShapes } from "../pipeline/compute/drop-shape-plan.js";
import { makeWavelengthGrid, wavelengthsNm } from "../lib/spectra/grid.js";
import { dropMedia } from "../lib/water/drop-medium.js";
import type { ShapedRowSpec, ShapedDrop } from "../lib/bow/shaped-rows.js";
import { cpuTimed } from "./timing.js";

type Rows = { perp: Float64Array; par: Float64Array }[];
interface Build {
  name: string;
  shapedRows: (spec: ShapedRowSpec, drops: readonly ShapedDrop[], thetaDeg: Float64Array, stepDeg: number) => Rows;
  shapedNodeRows: (spec: ShapedRowSpec, drops: readonly ShapedDrop[], thetaDeg: Float64Array, stepDeg: number, nodes: number[]) => { rows: Rows[] };
  /** One plane's row (lib/bow/shaped-plane-rows.ts), |S1|² + |S2|², with the build's own sweep unless options say otherwise. */
  planeRow: (tiltDeg: number, options: Record<string, number | boolean>) => Float64Array;
  tracerPrototype: { traceAt: (...args: number[]) => boolean };
}

async function loadBuild(name: string, root: string): Promise<Build> {
  const at = (path: string) => import(pathToFileURL(resolve(root, path)).href);
  const rows = await at("lib/bow/shaped-rows.js");
  const sweep = await at("lib/rays/plane-sweep.js");
  const planeRows = await at("lib/bow/shaped-plane-rows.js");
  const shape = await at("lib/drops/shape/equilibrium-shape.js");
  const geometry = await at("lib/rays/bow-geometry.js");
  // P4's drop upright or canted across the plane at the top of the bow, at 580 nm (as the one-plane workloads).
  const planeRow = (tiltDeg: number, options: Record<string, number | boolean>) => {
    const setup = { outline: shape.equilibriumOutline(1000), axis: geometry.cantedAxis(0, tiltDeg), n: media[20].mRe };
    const ctx = planeRows.shapedPlaneContext(setup, geometry.bowScatteringPlane(p4Spec.sunElevationDeg, p4Spec.arcPositionDeg), 1, thetaDeg, 0.05, options);
    const perp = new Float64Array(thetaDeg.length);
    const par = new Float64Array(thetaDeg.length);
    planeRows.shapedPlaneRow(ctx, drop(1000, media[20]).x, perp, par);
    return perp.map((v, j) => v + par[j]);
  };
  return { name, shapedRows: rows.shapedRows, shapedNodeRows: rows.shapedNodeRows, planeRow, tracerPrototype: sweep.PlaneTracer.prototype };
}

function argument(flag: string): string | undefined {
  const k = process.argv.indexOf(flag);
  return k >= 0 ? process.argv[k + 1] : undefined;
}

const cpuMs = (fn: () => void): number => cpuTimed(fn).ms;

function countTraces(build: Build, fn: () => void): number {
  const original = build.tracerPrototype.traceAt;
  let count = 0;
  build.tracerPrototype.traceAt = function (this: unknown, ...args: number[]) {
    count++;
    return original.apply(this, args);
  };
  try {
    fn();
  } finally {
    build.tracerPrototype.traceAt = original;
  }
  return count;
}

/** Largest |a − b| over the row's peak, and over |a| where |a| is at least 1e-6 of the peak, across rows. */
function rowDifference(a: Rows, b: Rows): { overPeak: number; pointwise: number } {
  let overPeak = 0;
  let pointwise = 0;
  a.forEach((row, d) => {
    for (const key of ["perp", "par"] as const) {
      const x = row[key];
      const y = b[d][key];
      const peak = x.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
      for (let j = 0; j < x.length; j++) {
        const diff = Math.abs(x[j] - y[j]);
        overPeak = Math.max(overPeak, diff / peak);
        if (Math.abs(x[j]) >= 1e-6 * peak) pointwise = Math.max(pointwise, diff / Math.abs(x[j]));
      }
    }
  });
  return { overPeak, pointwise };
}

/** The flattened-drop spec the service plans for a request body. */
function specOf(body: unknown): ShapedRowSpec {
  const parsed = profileRequestSchema.parse(body);
  return planDropShapes(parsed, latticeRadiusQuadrature(toDistribution(parsed.drops)).radiiUm).shapes.find((s) => s !== undefined)!;
}
const request = profileRequestSchema.parse(P4.body);
const p4Spec = specOf(P4.body);
const arc45Spec = specOf({ drops: { kind: "monodisperse", radiusUm: 2000, shape: { kind: "equilibrium" } }, arcPositionDeg: 45 });
const grid = makeWavelengthGrid(request.spectral.fromNm, request.spectral.toNm, request.spectral.stepNm);
const { media } = dropMedia(request.water, wavelengthsNm(grid));
const thetaDeg = Float64Array.from({ length: 600 }, (_, j) => 120.025 + 0.05 * j);
const drop = (radiusUm: number, m: (typeof media)[number]): ShapedDrop => ({ radiusUm, mRe: m.mRe, x: (2 * Math.PI * m.nAir * radiusUm) / (m.wavelengthNm * 1e-3) });
const onePlane = { ...p4Spec, traceEveryIndex: true };
/** One canting node's plane: 0 the upright drop (its axis in the plane: v* = 0 by symmetry), 3 tilted across the plane (1 and 2 tilt it within the plane at the top of the bow). */
const planeOf = (b: Build, node: number): Rows => [sumShares(b.shapedNodeRows(onePlane, [drop(1000, media[20])], thetaDeg, 0.05, [node]).rows[0])];

/** The node's row: the sum of its shares (a build that splits the orders into groups returns one share a group). */
function sumShares(shares: Rows): Rows[number] {
  const add = (key: "perp" | "par") => shares.reduce((sum, share) => sum.map((v, j) => v + share[key][j]), new Float64Array(thetaDeg.length));
  return { perp: add("perp"), par: add("par") };
}

interface Workload {
  name: string;
  run: (b: Build) => Rows;
  /** Rows are one per wavelength of the grid: compared in colour too. */
  spectral?: boolean;
}
const workloads: Workload[] = [
  { name: "one traced plane, upright drop (P4's drop, 580 nm)", run: (b: Build) => planeOf(b, 0) },
  { name: `one traced plane, drop canted ${(Math.sqrt(3) * p4Spec.cantingSdDeg).toFixed(1)}° (P4's canting node 3, across the plane, 580 nm)`, run: (b: Build) => planeOf(b, 3) },
  ...(process.argv.includes("--p4")
    ? [
        { name: `P4 (canting ${p4Spec.cantingSdDeg}°, ${media.length} wavelengths)`, run: (b: Build) => b.shapedRows(p4Spec, media.map((m) => drop(1000, m)), thetaDeg, 0.05), spectral: true },
        { name: `2 mm equilibrium drops, arc 45° (canting ${arc45Spec.cantingSdDeg}°, ${media.length} wavelengths)`, run: (b: Build) => b.shapedRows(arc45Spec, media.map((m) => drop(2000, m)), thetaDeg, 0.05), spectral: true },
      ]
    : []),
];

const builds = [await loadBuild("this build", resolve(new URL("..", import.meta.url).pathname))];
const against = argument("--against");
if (against) builds.push(await loadBuild(argument("--label") === undefined ? `build at ${against}` : "earlier build", against));
const rounds = Number(argument("--rounds") ?? 5);
const label = argument("--label") ?? against ?? "";
const loadBefore = loadavg()[0];
/** Table rows for BENCHMARKS.md (with two builds). */
const table: string[] = [];

for (const w of workloads) {
  // Warm-up and the untimed pass: traces counted and rows kept for the comparison.
  const results = builds.map((b) => {
    let rows: Rows = [];
    const traces = countTraces(b, () => (rows = w.run(b)));
    return { traces, rows };
  });
  // Plain runs after the counting pass (its wrapper costs the compiled code a round of re-optimisation): measured, the
  // first three rounds after a single one took 3–10× the rest on the first workload.
  for (let k = 0; k < 3; k++) for (const b of builds) w.run(b);
  const times: number[][] = builds.map(() => []);
  for (let r = 0; r < rounds; r++) {
    // Alternating order each round, so that neither build always runs after the other.
    const order = r % 2 === 0 ? builds.map((_, k) => k) : builds.map((_, k) => builds.length - 1 - k);
    for (const k of order) times[k].push(cpuMs(() => w.run(builds[k])));
  }
  console.log(`${w.name}:`);
  builds.forEach((b, k) => console.log(`  ${b.name}: CPU median ${median(times[k]).toFixed(0)} ms (${times[k].map((t) => t.toFixed(0)).join(", ")}), ${results[k].traces} traces`));
  if (builds.length > 1) {
    const diff = rowDifference(results[1].rows, results[0].rows);
    console.log(`  CPU ratio ${(median(times[0]) / median(times[1])).toFixed(3)}; rows: max |Δ| ${diff.overPeak.toExponential(2)} of the peak, ${diff.pointwise.toExponential(2)} relative (bins ≥ 1e-6 of the peak)`);
    let colour = "–";
    if (w.spectral) {
      const [mine, theirs] = [results[0].rows, results[1].rows].map(xyzOfRows);
      const d = xyzDeltaE(theirs, mine, thetaDeg.map((t) => 180 - t));
      const peaks = [peakThetaDeg(theirs, 134, 142), peakThetaDeg(mine, 134, 142), peakThetaDeg(theirs, 124, 132), peakThetaDeg(mine, 124, 132)];
      colour = `worst ΔE2000 ${d.worst.toFixed(4)} at ψ ${d.at.toFixed(2)}°, mean ${d.mean.toFixed(5)}; peaks of Y: primary Θ ${peaks[1].toFixed(4)}° vs ${peaks[0].toFixed(4)}°, secondary ${peaks[3].toFixed(4)}° vs ${peaks[2].toFixed(4)}°`;
      console.log(`  colour: ${colour}`);
    }
    table.push(
      `| ${w.name} | ${median(times[1]).toFixed(0)} | ${median(times[0]).toFixed(0)} | ${(median(times[0]) / median(times[1])).toFixed(2)} | ${results[1].traces} | ${results[0].traces} | ${diff.overPeak.toExponential(1)} | ${colour} |`,
    );
  }
}

/** XYZ per angle of rows[wavelength] (|S1|² + |S2|²), an equal-energy spectrum. */
function xyzOfRows(rows: Rows): Float64Array {
  const count = rows.length;
  const spectra = new Float64Array(thetaDeg.length * count);
  rows.forEach((row, i) => {
    for (let j = 0; j < thetaDeg.length; j++) spectra[j * count + i] = row.perp[j] + row.par[j];
  });
  return spectraToXyz(grid, spectra, request.observer);
}

/** Θ of the largest Y within [loDeg, hiDeg], refined by the parabola through it and its neighbours. */
function peakThetaDeg(xyz: Float64Array, loDeg: number, hiDeg: number): number {
  let best = -1;
  for (let j = 1; j + 1 < thetaDeg.length; j++) {
    if (thetaDeg[j] < loDeg || thetaDeg[j] > hiDeg) continue;
    if (best < 0 || xyz[3 * j + 1] > xyz[3 * best + 1]) best = j;
  }
  const [a, b, c] = [xyz[3 * best - 2], xyz[3 * best + 1], xyz[3 * best + 4]];
  return thetaDeg[best] + (0.5 * (thetaDeg[1] - thetaDeg[0]) * (a - c)) / (a - 2 * b + c);
}

// Which build is nearer the truth where rows differ: both builds' row of each one-plane workload's plane against a full
// sweep (every sample traced) 8× denser, where a run of rays ends within 1/8 of a sample spacing of where it really ends.
const denseLines = [
  { name: "upright", tiltDeg: 0 },
  { name: "canted", tiltDeg: Math.sqrt(3) * p4Spec.cantingSdDeg },
].map(({ name, tiltDeg }) => {
  const dense = builds[0].planeRow(tiltDeg, { halfSegments: 8 * 4000, coarseStep: 1 });
  const densePeak = dense.reduce((m, v) => Math.max(m, v), 0);
  const lines = builds.map((b) => {
    const row = b.planeRow(tiltDeg, {});
    let sum = 0;
    let most = 0;
    for (let j = 0; j < row.length; j++) {
      sum += Math.abs(row[j] - dense[j]) / densePeak;
      most = Math.max(most, Math.abs(row[j] - dense[j]) / densePeak);
    }
    return `${b.name}: Σ|Δ| ${sum.toExponential(2)}, max |Δ| ${most.toExponential(2)} of the peak`;
  });
  return `${name} plane: ${lines.join("; ")}`;
});
console.log(`against a full sweep 8× denser: ${denseLines.join("; ")}`);

if (process.argv.includes("--write") && table.length > 0) {
  writeMarkedSection("plane-trace", [
    "## Flattened drops: one traced scattering plane, side by side with an earlier build",
    "",
    `Written by \`node dist/bench/plane-trace.js --against … --write\` (bench/plane-trace.ts), ${benchDate()}; ${machineLine()}; one thread;`,
    `one-minute load average ${loadBefore.toFixed(2)} at the start, ${loadavg()[0].toFixed(2)} at the end (other processes shared the cores: compare the two`,
    `columns of a row, measured in alternating rounds in one process, not rows of other sections). Earlier build: ${label}. CPU: median of ${rounds} rounds`,
    "after a warm-up. Traces: rays traced through the drop (PlaneTracer.traceAt calls). Rows: largest |Δ| of |S1|² + |S2|²",
    "over the row's peak. Colour: CIEDE2000 per angle of an equal-energy spectrum's XYZ, and the peaks of Y (Θ, degrees: this build vs",
    "the earlier one).",
    "",
    "| workload | CPU earlier (ms) | CPU now (ms) | ratio | traces earlier | traces now | rows Δ / peak | colour |",
    "|---|---|---|---|---|---|---|---|",
    ...table,
    "",
    `The one-plane workloads' rows (580 nm) against a full sweep 8× denser (every sample traced, with this build's search): ${denseLines.join("; ")}.`,
    "When the earlier build is main at fed3c0c (before the ray differentials, the same coarse sweep and look):",
    "Reading: each trace now carries d(dir)/dv and d(point)/dv (lib/rays/shape-tracer.ts), so the in-plane search is Newton's with the",
    "exact ∂Y/∂v (no second trace for it), ends at a step below 1e-8 carried to first order, and halves a step that lands on a miss",
    "(stopping where the next step would reach it again);",
    "the traces fall by the counts above. Rows move at the ends of runs of rays (near the rim, where the earlier forward difference of",
    "∂Y/∂v was off or its search missed a ray): against sweeps 8× denser the new rows are as near or nearer (the two planes here;",
    "P4's canting node 1 at 590 nm, order 3: Σ|Δ| 1.7e-4 of the peak new, 2.3e-3 earlier; node 3 at 590 nm: the interpolated sweep",
    "finds a ray the denser sweep has). On 2 mm drops at arc 45° the earlier build's look found no order-3 ray at all on canting",
    "nodes 2 and 4 (its search from v = 0 failed at every look sample, windowed or not, dense or not), so their secondary bow was",
    "missing: that is the large row and colour change there; the traces now include that bow's. (The new build's sweep 8× denser",
    "finds 14138 order-3 rays, Θ 107.5–133°, on node 2 at n = 1.3339, near 580 nm's 1.3337). The rest of the CPU is the look, the fill, allocation and the",
    "bow tables, not traces.",
  ]);
}
