// node dist/bench/tracer-reference.js [--write] (--write: the tracer-reference section of BENCHMARKS.md): what one ray
// through a flattened drop costs in our tracer (lib/rays/shape-tracer.ts traceDrop: orders 0–3, both polarisations, the
// ray differential) beside a plain C translation of it (bench/reference/tracer-reference.c, built here with the
// system's `cc -O3 -march=native`), on the same rays in the same run, alternating rounds. Both time the tracing alone
// (no process start, no output); the checksums say both traced the same thing. The flattened-drop engine's cost is rays
// traced (bench/plane-trace.ts counts them per plane), so this ratio bounds what a compiled tracer could give it.

import { execFileSync } from "node:child_process";
import { performance } from "node:perf_hooks";
import { loadavg } from "node:os";
import { median } from "./stats.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { compileReference, NATIVE_FLAGS } from "./compiled-reference.js";
import { allocateTrace, AT, ORDER_STRIDE, traceDrop, type DropTraceSetup, type TraceOutput } from "../lib/rays/shape-tracer.js";
import { equilibriumOutline, equilibriumShapeCoefficients } from "../lib/drops/shape/equilibrium-shape.js";
import { waterIndex } from "../lib/water/water-index.js";

const write = process.argv.includes("--write");
const RAYS = 100_000;
const ROUNDS = 5;
const SEED = 12345;
const MAX_ORDER = 3;

interface Case {
  name: string;
  radiusUm: number;
  /** Tilt of the drop's axis across the scattering plane, and the sun's elevation (degrees). */
  tiltDeg: number;
  sunDeg: number;
}
const CASES: Case[] = [
  { name: "1 mm equilibrium drop, upright, sun 10°", radiusUm: 1000, tiltDeg: 0, sunDeg: 10 },
  { name: "2 mm equilibrium drop, canted 10°, sun 10°", radiusUm: 2000, tiltDeg: 10, sunDeg: 10 },
  { name: "2.5 mm equilibrium drop, upright, sun 5°", radiusUm: 2500, tiltDeg: 0, sunDeg: 5 },
];

const rad = (deg: number) => (deg * Math.PI) / 180;

/**
 * The pupil points, drawn as the C program draws them: u then v per ray over ±bound, from the minimal standard generator
 * x ← 48271·x mod (2³¹ − 1) (Park, Miller & Stockmeyer 1993, Commun. ACM 36(7), 105, from memory), whose products stay
 * below 2⁵³ and so are exact in doubles on both sides.
 */
function pupil(bound: number): Float64Array {
  const points = new Float64Array(2 * RAYS);
  let seed = SEED;
  const next = () => (seed = (seed * 48271) % 2147483647) / 2147483647;
  for (let i = 0; i < 2 * RAYS; i++) points[i] = (next() * 2 - 1) * bound;
  return points;
}

/** As checksum_of in the C program: Σ over the orders that left of dir·(1, 2, 3) + Σ d(dir)/dv + path + |e1|². */
function checksumOf(out: TraceOutput): number {
  let sum = 0;
  const rec = out.orders;
  for (let p = 0; p <= MAX_ORDER; p++) {
    const o = p * ORDER_STRIDE;
    if (rec[o + AT.valid] !== 1) continue;
    sum += rec[o + AT.dir] + 2 * rec[o + AT.dir + 1] + 3 * rec[o + AT.dir + 2];
    sum += rec[o + AT.dirV] + rec[o + AT.dirV + 1] + rec[o + AT.dirV + 2];
    sum += rec[o + AT.path];
    for (let c = 0; c < 3; c++) sum += rec[o + AT.e1Re + c] ** 2 + rec[o + AT.e1Im + c] ** 2;
  }
  return sum;
}

function geometry(c: Case) {
  const sun = rad(c.sunDeg);
  const tilt = rad(c.tiltDeg);
  // Sunlight travels down at the sun's elevation in the x–z plane; the drop's axis leans across it (towards y).
  const d = [Math.cos(sun), 0, -Math.sin(sun)] as const;
  const e1 = [0, 1, 0] as const;
  const e2 = [Math.sin(sun), 0, Math.cos(sun)] as const;
  const axis = [0, Math.sin(tilt), Math.cos(tilt)] as const;
  return { d, e1, e2, axis };
}

function timeOurs(c: Case, n: number): { ms: number; checksum: number } {
  const { d, e1, e2, axis } = geometry(c);
  const outline = equilibriumOutline(c.radiusUm);
  const setup: DropTraceSetup = { outline, axis, n, absorptionPerRadius: 0, maxOrder: MAX_ORDER };
  const points = pupil(outline.maxRadius);
  const launch = 2 * outline.maxRadius + 1;
  const out = allocateTrace(MAX_ORDER);
  const o = new Float64Array(3);
  const start = performance.now();
  let checksum = 0;
  for (let i = 0; i < RAYS; i++) {
    const u = points[2 * i];
    const v = points[2 * i + 1];
    for (let k = 0; k < 3; k++) o[k] = u * e1[k] + v * e2[k] - launch * d[k];
    if (traceDrop(setup, o, d, e1, e2, out, e2).hit) checksum += checksumOf(out);
  }
  return { ms: performance.now() - start, checksum };
}

function timeCompiled(binary: string, c: Case, n: number): { ms: number; checksum: number } {
  const { d, e1, e2, axis } = geometry(c);
  const coefficients = equilibriumShapeCoefficients((2 * c.radiusUm) / 1000);
  const args = [n, 0, MAX_ORDER, ...axis, ...d, ...e1, ...e2, RAYS, SEED, 3, ...coefficients].map(String);
  const [ms, , checksum] = execFileSync(binary, args, { encoding: "utf8" }).trim().split(/\s+/).map(Number);
  return { ms, checksum };
}

const built = compileReference("tracer-reference.c", NATIVE_FLAGS);
if ("missing" in built) {
  console.log(built.missing);
  process.exit(0);
}
const loadStart = loadavg()[0];
// Fresh water at 15 °C and 589 nm (lib/water/water-index.ts): a mid-spectrum index.
const n = waterIndex({ wavelengthNm: 589, temperatureC: 15, salinityPsu: 0 }).nRelativeToAir;
const rows: string[] = [];
for (const c of CASES) {
  timeOurs(c, n); // warm-up: the JIT's tiers
  const ours: number[] = [];
  const compiled: number[] = [];
  let checksums = { ours: 0, compiled: 0 };
  for (let round = 0; round < ROUNDS; round++) {
    const a = timeOurs(c, n);
    const b = timeCompiled(built.binary, c, n);
    ours.push(a.ms);
    compiled.push(b.ms);
    checksums = { ours: a.checksum, compiled: b.checksum };
  }
  const oursUs = (1000 * median(ours)) / RAYS;
  const compiledUs = (1000 * median(compiled)) / RAYS;
  const agree = Math.abs(checksums.ours - checksums.compiled) / Math.abs(checksums.compiled);
  const row = `| ${c.name} | ${oursUs.toFixed(2)} | ${compiledUs.toFixed(2)} | ${(oursUs / compiledUs).toFixed(2)} | ${agree.toExponential(1)} |`;
  console.log(row);
  rows.push(row);
}
const lines = [
  "## Flattened drops: one traced ray, ours beside compiled C",
  "",
  `Written by \`node dist/bench/tracer-reference.js --write\` (bench/tracer-reference.ts), ${benchDate()}; ${machineLine()}; one thread;`,
  `one-minute load average ${loadStart.toFixed(2)} at the start, ${loadavg()[0].toFixed(2)} at the end. ${RAYS} rays a pass over a square pupil of`,
  `the drop's bounding radius (misses included, as sweeps meet them), orders 0–3 with both polarisations and the ray differential, water at`,
  `n = ${n.toFixed(5)}. Ours: lib/rays/shape-tracer.ts traceDrop; compiled: bench/reference/tracer-reference.c, its C translation step for step,`,
  `built with ${built.compiler}. Wall time per ray, medians of ${ROUNDS} alternating rounds (the C program's own median of 3 passes a round).`,
  "Checksums: relative difference of Σ over the rays of each order's direction, its derivative, path and power (rounding alone, e.g. fused multiply-add in C).",
  "",
  "| rays through | ours (µs a ray) | compiled (µs a ray) | ours ÷ compiled | checksums differ by |",
  "|---|---|---|---|---|",
  ...rows,
];
if (write) writeMarkedSection("tracer-reference", lines);
else console.log(lines.join("\n"));
