// The sub-lattice interpolation alone (lib/bow/mie-sub-lattice.ts interpolateSubLattice, TypeScript) against its
// WebAssembly SIMD version (lib/bow/simd-sub-lattice.ts), side by side in one process: the rows of fog drops
// (x = 40–450 in even steps of ln x: about P2's lognormal 10 µm, σg 1.4, at 380–780 nm) on ψ 20–60° of the 0.05°
// lattice, each with its own sub-lattice factor. Rounds alternate which goes first; CPU time (process.cpuUsage).
// node dist/bench/sub-lattice-interpolation.js [--rounds=N]

import { pathToFileURL } from "node:url";
import { median } from "./stats.js";
import { mieTermCount } from "../lib/mie/termCount.js";
import { interpolateSubLattice, subLatticeFactor, subLatticeNodes, subLatticeWeights } from "../lib/bow/mie-sub-lattice.js";
import { interpolateSubLatticeSimd, simdSubLatticeAvailable } from "../lib/bow/simd-sub-lattice.js";

const H_DEG = 0.05;
const LO = Math.round(20 / H_DEG);
const HI = Math.round(60 / H_DEG);
const DROPS = 400;

interface Case {
  c: number;
  qLo: number;
  a: Float64Array;
  b: Float64Array;
}

function cases(): Case[] {
  const out: Case[] = [];
  for (let d = 0; d < DROPS; d++) {
    const x = 40 * (450 / 40) ** (d / (DROPS - 1));
    const c = subLatticeFactor(mieTermCount(x), H_DEG);
    if (c === 1) continue;
    const { qLo, qHi } = subLatticeNodes(LO, HI, c);
    const n = qHi - qLo + 1;
    // smooth positive rows: the values do not change the work, only their count does
    out.push({ c, qLo, a: Float64Array.from({ length: n }, (_, k) => 2 + Math.sin(0.7 * k + d)), b: Float64Array.from({ length: n }, (_, k) => 2 + Math.cos(0.5 * k + d)) });
  }
  return out;
}

function cpuMs(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

export interface InterpolationTimes {
  drops: number;
  outputs: number;
  jsMs: number[];
  simdMs: number[];
}

/** CPU ms of one pass over every drop, per round, for each implementation; null where WebAssembly SIMD is missing. */
export function timeInterpolation(rounds: number): InterpolationTimes | null {
  if (!simdSubLatticeAvailable) return null;
  const all = cases();
  const outA = new Float64Array(HI - LO + 1);
  const outB = new Float64Array(HI - LO + 1);
  const pass = (simd: boolean): number => {
    const t0 = cpuMs();
    for (const k of all) {
      const w = subLatticeWeights(k.c);
      if (simd) interpolateSubLatticeSimd(k.a, k.b, k.qLo, k.c, w, LO, HI, outA, outB);
      else interpolateSubLattice(k.a, k.b, k.qLo, k.c, w, LO, HI, outA, outB);
    }
    return cpuMs() - t0;
  };
  // JIT and weights: one pass each before timing
  pass(false);
  pass(true);
  const times: InterpolationTimes = { drops: all.length, outputs: all.length * (HI - LO + 1), jsMs: [], simdMs: [] };
  for (let round = 0; round < rounds; round++) {
    for (const simd of round % 2 === 0 ? [false, true] : [true, false]) (simd ? times.simdMs : times.jsMs).push(pass(simd));
  }
  return times;
}

export function interpolationLine(t: InterpolationTimes | null): string {
  if (t === null) return "Interpolation alone: WebAssembly SIMD missing here, not measured.";
  const js = median(t.jsMs);
  const simd = median(t.simdMs);
  return (
    `Interpolation alone (bench/sub-lattice-interpolation.ts, ${t.drops} fog rows, x = 40–450, ψ 20–60° on the 0.05° lattice, ${t.jsMs.length} alternating rounds, ` +
    `CPU medians): TypeScript ${js.toFixed(1)} ms, WebAssembly SIMD ${simd.toFixed(1)} ms (${(js / simd).toFixed(2)}×), values equal to the bit.`
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const rounds = Number(process.argv.find((a) => a.startsWith("--rounds="))?.slice("--rounds=".length) ?? 9);
  const t = timeInterpolation(rounds);
  if (t) console.log(`TypeScript ${t.jsMs.map((v) => v.toFixed(1)).join(", ")} ms; SIMD ${t.simdMs.map((v) => v.toFixed(1)).join(", ")} ms`);
  console.log(interpolationLine(t));
}
