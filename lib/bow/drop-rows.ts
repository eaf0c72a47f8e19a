// |S1|², |S2|² of one drop at one wavelength over an angle grid, by the engine chosen for its size. What does
// not depend on the drop's size (ray-optics bins, the bows' uniform tables) is prepared once per wavelength.

import { mieCoefficientsScratch } from "../mie/coefficients-scratch.js";
import { mieAmplitudes } from "../mie/amplitudes.js";
import { debyeCoefficients } from "../mie/debye.js";
import type { MieCoefficients } from "../mie/types.js";
import { mieAmplitudesManyDrops } from "../mie/many-drops.js";
import { allocateAmplitudes, type MieAmplitudes } from "../mie/types.js";
import { rayOpticsBins, type RayBins } from "./ray-bins.js";
import { addUniformBowBins, uniformBowTable, type UniformBowTable } from "./airy-bins.js";
import { AIRY_BOW_ORDERS, RAY_ORDERS, type DropEngine } from "./volume-scattering.js";
import { cellSampleRadiusUm, type CellAverage } from "./cell-average.js";
import type { DropMedium } from "../water/drop-medium.js";
import type { RowArena } from "./row-arena.js";

export type { CellAverage } from "./cell-average.js";

export interface DropRowContext {
  mRe: number;
  mIm: number;
  /** k = 2π n_air / λ, per metre. */
  waveNumberPerM: number;
  thetaDeg: Float64Array;
  cosTheta: Float64Array;
  /** dropRow's buffer for one drop's S1, S2, allocated on its first use (the many-drops path never needs it). */
  amplitudes?: MieAmplitudes;
  raysAll: RayBins | null;
  /** Everything in the airy engine that scales as x²: orders 0, 1, and the bows' orders where they are ray optics. */
  raysAiryEngine: RayBins | null;
  bowTables: (UniformBowTable | null)[];
  /** One Debye order p alone (scattering-orders.ts), or undefined for the whole drop. */
  order?: number;
}

/**
 * Θ ascending and evenly spaced by stepDeg (ray and Airy engines give bin means over each step). With an order p,
 * the rows hold that Debye order alone: the approximate engines keep only its rays (or its bow), Lorenz–Mie drops
 * take the Debye coefficients of order p (lib/mie/debye.ts) in place of the whole a_n, b_n.
 */
export function dropRowContext(
  medium: DropMedium,
  thetaDeg: Float64Array,
  stepDeg: number,
  engines: ReadonlySet<DropEngine>,
  order?: number,
): DropRowContext {
  const n = medium.mRe;
  const needsAiry = engines.has("airy");
  const airyOrders = AIRY_BOW_ORDERS as readonly number[];
  const kept = (p: number) => order === undefined || p === order;
  const rayOrders = RAY_ORDERS.filter(kept);
  const bowTables = AIRY_BOW_ORDERS.map((p) => (needsAiry && kept(p) ? uniformBowTable(n, p, thetaDeg, stepDeg) : null));
  let raysAiryEngine: RayBins | null = null;
  if (needsAiry) {
    raysAiryEngine = rayOpticsBins(n, rayOrders.filter((p) => !airyOrders.includes(p)), thetaDeg, stepDeg);
    const { perpendicular, parallel } = raysAiryEngine;
    AIRY_BOW_ORDERS.forEach((p, o) => {
      if (!kept(p)) return;
      const table = bowTables[o]!;
      const uniformBins = table.uniform.reduce((sum, u) => sum + u, 0);
      if (uniformBins === 0) bowTables[o] = null;
      // Where only one ray of the order arrives there is nothing to interfere: ray optics (not needed, and not
      // computed, when the bow's formula serves every bin).
      const rays = uniformBins < thetaDeg.length ? rayOpticsBins(n, [p], thetaDeg, stepDeg) : null;
      for (let j = 0; j < thetaDeg.length; j++) {
        perpendicular[j] += table.uniform[j] ? table.otherPerp[j] : rays!.perpendicular[j];
        parallel[j] += table.uniform[j] ? table.otherPar[j] : rays!.parallel[j];
      }
    });
  }
  return {
    mRe: n,
    mIm: medium.mIm,
    waveNumberPerM: waveNumberPerM(medium),
    thetaDeg,
    cosTheta: thetaDeg.map((t) => Math.cos((t * Math.PI) / 180)),
    raysAll: engines.has("geometric") ? rayOpticsBins(n, rayOrders, thetaDeg, stepDeg) : null,
    raysAiryEngine,
    bowTables,
    ...(order === undefined ? {} : { order }),
  };
}

/** a_n, b_n of a Lorenz–Mie drop: the whole (scratch buffer), or the context's Debye order alone. */
function dropCoefficients(ctx: DropRowContext, x: number): MieCoefficients {
  return ctx.order === undefined ? mieCoefficientsScratch(ctx.mRe, ctx.mIm, x) : debyeCoefficients(ctx.mRe, ctx.mIm, x, ctx.order);
}

/**
 * Writes |S1|², |S2|² (Bohren–Huffman convention) into perp, par; returns the Mie term-angles spent. With an
 * average (Lorenz–Mie only), the mean of |S|² over the cell's sizes (cell-average.ts).
 */
export function dropRow(ctx: DropRowContext, engine: DropEngine, radiusUm: number, perp: Float64Array, par: Float64Array, average?: CellAverage): number {
  const nTheta = ctx.thetaDeg.length;
  const x = ctx.waveNumberPerM * radiusUm * 1e-6;
  perp.fill(0);
  par.fill(0);
  if (engine === "mie") {
    const samples = average && average.samples > 1 ? average.samples : 1;
    const share = 1 / samples;
    let termAngles = 0;
    for (let s = 0; s < samples; s++) {
      const xs = samples === 1 ? x : ctx.waveNumberPerM * cellSampleRadiusUm(radiusUm, average!, s) * 1e-6;
      const c = dropCoefficients(ctx, xs);
      addSquares(mieAmplitudes(c, ctx.cosTheta, (ctx.amplitudes ??= allocateAmplitudes(nTheta))), share, { perp, par }, nTheta);
      termAngles += c.nTerms * nTheta;
    }
    return termAngles;
  }
  if (engine === "geometric") {
    addScaled(perp, par, ctx.raysAll!, x * x);
    return 0;
  }
  addScaled(perp, par, ctx.raysAiryEngine!, x * x);
  // A null table: the order's bow formula serves no bin of this grid (its rays are all in raysAiryEngine).
  for (const table of ctx.bowTables) if (table) addUniformBowBins(table, x, 1, perp, par);
  return 0;
}

/** Sizes handed to the many-drops kernel at once: enough to share each angular table among many drops. */
const MIE_SIZES_PER_PASS = 64;

/**
 * As dropRow for Lorenz–Mie drops, many at once (lib/mie/many-drops.ts: the angular functions once per block of
 * angles for all of them): |S1|², |S2|² per drop (the mean over its cell's sizes with an average), the same values
 * as dropRow to the bit; and the Mie term-angles spent.
 */
export function mieRows(
  ctx: DropRowContext,
  drops: readonly { radiusUm: number; average?: CellAverage }[],
  cosTheta: Float64Array = ctx.cosTheta,
  arena?: RowArena,
): { rows: { perp: Float64Array; par: Float64Array }[]; termAngles: number } {
  const nTheta = cosTheta.length;
  // The sizes in typed arrays rather than objects: objects with a share of 1 (a small integer to V8) and of 1/8 (a
  // double) have two layouts, and a fog task after a rain one threw away the compiled code built for the first.
  const samplesOf = (drop: (typeof drops)[number]) => (drop.average && drop.average.samples > 1 ? drop.average.samples : 1);
  const count = drops.reduce((sum, drop) => sum + samplesOf(drop), 0);
  const sizeDrop = new Int32Array(count);
  const sizeX = new Float64Array(count);
  const sizeShare = new Float64Array(count);
  let at = 0;
  drops.forEach((drop, i) => {
    const samples = samplesOf(drop);
    for (let s = 0; s < samples; s++, at++) {
      const radiusUm = samples === 1 ? drop.radiusUm : cellSampleRadiusUm(drop.radiusUm, drop.average!, s);
      sizeDrop[at] = i;
      sizeX[at] = ctx.waveNumberPerM * radiusUm * 1e-6;
      sizeShare[at] = 1 / samples;
    }
  });
  // With an arena (row-arena.ts) the rows and the passes' amplitudes are its scratch arrays, valid until its reset.
  const row = () => (arena ? arena.take(nTheta) : new Float64Array(nTheta));
  // Built by push from an empty literal (always packed elements), not by map(): an array from map() has the elements
  // kind of whichever tier ran it, and a fog task after a rain one found the other kind and threw the compiled code away.
  const rows: { perp: Float64Array; par: Float64Array }[] = [];
  for (let i = 0; i < drops.length; i++) rows.push({ perp: row(), par: row() });
  const outs = Array.from({ length: Math.min(MIE_SIZES_PER_PASS, count) }, () =>
    arena ? { s1Re: arena.take(nTheta, false), s1Im: arena.take(nTheta, false), s2Re: arena.take(nTheta, false), s2Im: arena.take(nTheta, false) } : allocateAmplitudes(nTheta),
  );
  let termAngles = 0;
  for (let first = 0; first < count; first += MIE_SIZES_PER_PASS) {
    const inPass = Math.min(MIE_SIZES_PER_PASS, count - first);
    mieAmplitudesManyDrops(
      inPass,
      (d) => {
        const c = dropCoefficients(ctx, sizeX[first + d]);
        termAngles += c.nTerms * nTheta;
        return c;
      },
      cosTheta,
      outs,
    );
    // In the order of the sizes, as dropRow adds them, so the means are the same to the bit.
    for (let d = 0; d < inPass; d++) addSquares(outs[d], sizeShare[first + d], rows[sizeDrop[first + d]], nTheta);
  }
  return { rows, termAngles };
}

/** perp += share·|S1|², par += share·|S2|² over the first nTheta angles. */
function addSquares(a: MieAmplitudes, share: number, row: { perp: Float64Array; par: Float64Array }, nTheta: number): void {
  const { perp, par } = row;
  for (let j = 0; j < nTheta; j++) {
    perp[j] += share * (a.s1Re[j] * a.s1Re[j] + a.s1Im[j] * a.s1Im[j]);
    par[j] += share * (a.s2Re[j] * a.s2Re[j] + a.s2Im[j] * a.s2Im[j]);
  }
}

function addScaled(perp: Float64Array, par: Float64Array, rays: RayBins, factor: number): void {
  for (let j = 0; j < perp.length; j++) {
    perp[j] += factor * rays.perpendicular[j];
    par[j] += factor * rays.parallel[j];
  }
}

/** k = 2π·n_air/λ, per metre: the wave number in the air around the drop, from which x = k·r. */
export function waveNumberPerM(medium: DropMedium): number {
  return (2 * Math.PI * medium.nAir) / (medium.wavelengthNm * 1e-9);
}
