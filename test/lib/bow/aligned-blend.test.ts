import { describe, expect, it } from "vitest";
import { addBlendedContexts, addShiftedContext, addShiftedRow, leaveOneOutMiss, padFor, paddedGrid, shiftScratch } from "../../../lib/bow/aligned-blend.js";
import { addUniformBowBins, uniformBowTable } from "../../../lib/bow/airy-bins.js";
import type { ShapedPlaneContext } from "../../../lib/bow/shaped-plane-rows.js";
import { airyBowIntensity, airyBowScale } from "../../../lib/rays/airy-bow.js";
import { chebyshevNodes, lagrangeWeights } from "../../../lib/rays/sweep-interpolation.js";

const STEP_DEG = 0.05;
/** Sub-samples per bin for the bin means (midpoint rule): its error, (h/20)²/24·|f″|, is about 1/1000 of the shift's bound h²/8·|f″|. */
const SUB = 20;

/** Bin means of Airy's |S1|² + |S2|² (Airy 1838, lib/rays/airy-bow.ts) of order k at index n on bins of STEP_DEG centred on gridDeg, with Θ moved by offsetDeg. */
function airyBins(n: number, x: number, gridDeg: Float64Array, offsetDeg = 0): Float64Array {
  const fine = Float64Array.from({ length: gridDeg.length * SUB }, (_, i) => gridDeg[Math.floor(i / SUB)] - STEP_DEG / 2 + ((i % SUB) + 0.5) * (STEP_DEG / SUB) - offsetDeg);
  const { perpendicular, parallel } = airyBowIntensity(n, x, 1, fine);
  return Float64Array.from(gridDeg, (_, j) => {
    let sum = 0;
    for (let i = j * SUB; i < (j + 1) * SUB; i++) sum += perpendicular[i] + parallel[i];
    return sum / SUB;
  });
}

/** The largest |f″| (per degree²) of Airy's row, by second differences on a fine grid around the bow. */
function airyCurvatureBound(n: number, x: number, loDeg: number, hiDeg: number): number {
  const h = 1e-4;
  const count = Math.round((hiDeg - loDeg) / h);
  const angles = Float64Array.from({ length: count }, (_, i) => loDeg + i * h);
  const { perpendicular, parallel } = airyBowIntensity(n, x, 1, angles);
  let worst = 0;
  for (let i = 1; i + 1 < count; i++) {
    const f = (k: number) => perpendicular[k] + parallel[k];
    worst = Math.max(worst, Math.abs(f(i + 1) - 2 * f(i) + f(i - 1)) / (h * h));
  }
  return worst;
}

/**
 * The primary blended across water's index: 7 Chebyshev nodes over 1.328–1.348 (water over 360–830 nm at 15 °C,
 * Daimon & Masumura 2007, from memory), the index n = 1.3411 between them, the nodes' bow angles (Descartes) and
 * Lagrange weights, the blended fold, and 160 bins from `belowDeg` under it on a grid padded for the nodes' shifts.
 */
function blendAcrossWater(x: number, belowDeg: number) {
  const nodes = chebyshevNodes(1.328, 1.348, 7);
  const n = 1.3411;
  const folds = nodes.map((m) => airyBowScale(m, x, 1).rainbowAngleDeg);
  const ell = lagrangeWeights(nodes, n);
  const target = folds.reduce((sum, f, i) => sum + ell[i] * f, 0);
  const grid = Float64Array.from({ length: 160 }, (_, j) => target - belowDeg + STEP_DEG * (j + 0.5));
  const pad = padFor(Math.max(...folds) - Math.min(...folds), STEP_DEG);
  return { nodes, n, folds, ell, target, grid, pad, padded: paddedGrid(grid, STEP_DEG, pad) };
}

describe("a row shifted across the angle grid (bin means, linear interpolation)", () => {
  const n = 1.3337;
  const x = 3000;
  const bowDeg = airyBowScale(n, x, 1).rainbowAngleDeg;
  const grid = Float64Array.from({ length: 120 }, (_, j) => bowDeg - 4 + STEP_DEG * (j + 0.5));

  it("equals Airy's row evaluated at the shifted angle within linear interpolation's bound h²/8·max|f″|", () => {
    const shiftDeg = 0.237;
    const pad = padFor(shiftDeg, STEP_DEG);
    const source = airyBins(n, x, paddedGrid(grid, STEP_DEG, pad));
    const shifted = new Float64Array(grid.length);
    addShiftedRow(source, pad, shiftDeg, STEP_DEG, 1, shifted);
    const expected = airyBins(n, x, grid, shiftDeg);
    // Linear interpolation of g(Θ) (the bin-mean function, |g″| ≤ max|f″|) errs by at most h²/8·max|g″| (Press et al. 2007 §3.1, from memory).
    const bound = (STEP_DEG ** 2 / 8) * airyCurvatureBound(n, x, grid[0] - 1, grid[grid.length - 1] + 1);
    const peak = Math.max(...expected);
    let worst = 0;
    expected.forEach((v, j) => (worst = Math.max(worst, Math.abs(shifted[j] - v))));
    // Measured: 4.3e-3 of the peak against a bound of 7.9e-3.
    expect(worst).toBeLessThanOrEqual(bound);
    // And the shift is not a no-op: the unshifted row misses by far more than the bound.
    let unshifted = 0;
    expected.forEach((v, j) => (unshifted = Math.max(unshifted, Math.abs(source[j + pad] - v))));
    expect(unshifted).toBeGreaterThan(0.3 * peak);
    expect(bound).toBeLessThan(0.05 * peak);
  });

  it("a whole number of bins moves the bins themselves (exactly); the weight scales; reading past the ends takes the end values", () => {
    const pad = 3;
    const source = airyBins(n, x, paddedGrid(grid, STEP_DEG, pad));
    const out = new Float64Array(grid.length);
    addShiftedRow(source, pad, 2 * STEP_DEG, STEP_DEG, 0.5, out);
    out.forEach((v, j) => expect(v).toBeCloseTo(0.5 * source[j + pad - 2], 12));
    const far = new Float64Array(grid.length);
    addShiftedRow(source, pad, -1000 * STEP_DEG, STEP_DEG, 1, far);
    far.forEach((v) => expect(v).toBe(source[source.length - 1]));
  });
});

describe("Airy bows at several refractive indices, shifted onto the interpolated bow angle and blended", () => {
  it("reproduce Airy's bow at an index between them (7 Chebyshev nodes over water's span; 2e-2 of the peak)", () => {
    // Water's index over 360–830 nm at 15 °C spans about 1.328–1.348 (Daimon & Masumura 2007, from memory): over it
    // the primary's Θ_R moves by ~1.9°, a hundred fringes' worth of 0.02° for x = 3000: unaligned, the blend is 7 bows.
    const x = 3000;
    const { nodes, n, folds, ell, target, grid, pad, padded } = blendAcrossWater(x, 5);
    // Θ_R(n) is smooth (Descartes): its Lagrange value from 7 nodes is within 1e-6° of the formula's.
    expect(Math.abs(target - airyBowScale(n, x, 1).rainbowAngleDeg)).toBeLessThan(1e-6);
    const blended = new Float64Array(grid.length);
    const plain = new Float64Array(grid.length);
    nodes.forEach((m, i) => {
      const row = airyBins(m, x, padded);
      addShiftedRow(row, pad, target - folds[i], STEP_DEG, ell[i], blended);
      addShiftedRow(row, pad, 0, STEP_DEG, ell[i], plain);
    });
    const expected = airyBins(n, x, grid);
    const peak = Math.max(...expected);
    const miss = (row: Float64Array) => Math.max(...Array.from(row, (v, j) => Math.abs(v - expected[j]))) / peak;
    // Measured: 7.0e-3 (the shift's linear interpolation, h²/8·|f″|, and the bows' own change of width with n); bound 2e-2.
    expect(miss(blended)).toBeLessThanOrEqual(2e-2);
    // Blended without the shift, the rows draw several bows: off by most of the peak.
    expect(miss(plain)).toBeGreaterThan(0.3);
  });
});

describe("leave-one-out miss of values at the nodes", () => {
  const nodes = chebyshevNodes(1.328, 1.348, 7);

  it("is rounding for a polynomial of degree 5 (Lagrange's formula on 6 nodes is exact for it: Press et al. 2007 §3.2)", () => {
    const values = nodes.map((n) => 3 - 2 * (n - 1.33) + 40 * (n - 1.33) ** 3 - 1e4 * (n - 1.33) ** 5);
    expect(leaveOneOutMiss(nodes, values)).toBeLessThan(1e-10);
  });

  it("is small for a smooth function and of order one for a pole between the nodes", () => {
    expect(leaveOneOutMiss(nodes, nodes.map((n) => Math.exp(10 * n)))).toBeLessThan(1e-6);
    const pole = 0.5 * (nodes[5] + nodes[6]);
    expect(leaveOneOutMiss(nodes, nodes.map((n) => 1 / (n - pole)))).toBeGreaterThan(0.1);
  });
});

describe("a context's bow shifted exactly (its uniform table's ẑ, u, v interpolated, Ai² integrated on the output bins)", () => {
  it("equals the sphere's uniform bow table built at the shifted angles, where interpolating bin means spreads a peak narrower than a bin", () => {
    // The primary of a 2.5 mm drop in red light (x ≈ 24,000): its first Airy maximum is ~0.03° wide, under a bin of 0.05°.
    const n = 1.3317;
    const x = 24000;
    const shiftDeg = 0.0213;
    const grid = Float64Array.from({ length: 80 }, (_, j) => 136 + STEP_DEG * (j + 0.5));
    const pad = padFor(shiftDeg, STEP_DEG);
    const table = uniformBowTable(n, 2, paddedGrid(grid, STEP_DEG, pad), STEP_DEG);
    const count = grid.length + 2 * pad;
    const ctx: ShapedPlaneContext = { raysPerX2: { perpendicular: new Float64Array(count), parallel: new Float64Array(count) }, bowTables: [table], folds: [] };
    const exact = { perp: new Float64Array(grid.length), par: new Float64Array(grid.length) };
    addShiftedContext(ctx, x, pad, shiftDeg, STEP_DEG, 1, exact.perp, exact.par, shiftScratch(grid.length));
    // Reference: the same formula's table on bins centred at Θ − shift (lib/bow/airy-bins.ts, Chester, Friedman & Ursell 1957).
    const expected = { perp: new Float64Array(grid.length), par: new Float64Array(grid.length) };
    addUniformBowBins(uniformBowTable(n, 2, grid.map((t) => t - shiftDeg), STEP_DEG), x, 1, expected.perp, expected.par);
    const padded = { perp: new Float64Array(count), par: new Float64Array(count) };
    addUniformBowBins(table, x, 1, padded.perp, padded.par);
    const spread = new Float64Array(grid.length);
    addShiftedRow(Float64Array.from(padded.perp, (v, j) => v + padded.par[j]), pad, shiftDeg, STEP_DEG, 1, spread);
    const total = Array.from(expected.perp, (v, j) => v + expected.par[j]);
    const peak = Math.max(...total);
    const miss = (row: ArrayLike<number>) => Math.max(...total.map((v, j) => Math.abs(row[j] - v))) / peak;
    // Measured: 4.5e-4 of the peak shifted exactly (ẑ interpolated linearly between edges), 8.9e-2 with the bin means
    // interpolated; bounds 2e-3 (4× the measured) and 2e-2.
    expect(miss(Array.from(exact.perp, (v, j) => v + exact.par[j]))).toBeLessThanOrEqual(2e-3);
    expect(miss(spread)).toBeGreaterThan(2e-2);
  });
});

describe("uniform bow tables at several refractive indices, blended before they are squared", () => {
  it("rebuild the uniform bow at an index between them, supernumeraries included, where blending the rows does not", () => {
    // The sphere's primary in the uniform form (Chester, Friedman & Ursell 1957; lib/bow/airy-bins.ts uniformBowTable)
    // at 7 Chebyshev nodes over water's span, x = 16,000 (a 1 mm drop in violet light): the fringes' spacing changes
    // with n, so rows shifted onto the blended fold keep each node's fringes where they lie.
    const x = 16000;
    const { nodes, n, folds, ell, target, grid, pad, padded } = blendAcrossWater(x, 2);
    const count = padded.length;
    const ctxOf = (m: number): ShapedPlaneContext => ({
      raysPerX2: { perpendicular: new Float64Array(count), parallel: new Float64Array(count) },
      bowTables: [uniformBowTable(m, 2, padded, STEP_DEG)],
      folds: [],
    });
    const sources = nodes.map((m, i) => ({ ctx: ctxOf(m), shiftDeg: target - folds[i], weight: ell[i], pad }));
    const scratch = shiftScratch(grid.length);
    const tables = { perp: new Float64Array(grid.length), par: new Float64Array(grid.length) };
    addBlendedContexts(sources, x, STEP_DEG, tables.perp, tables.par, scratch);
    const rows = { perp: new Float64Array(grid.length), par: new Float64Array(grid.length) };
    for (const source of sources) addShiftedContext(source.ctx, x, pad, source.shiftDeg, STEP_DEG, source.weight, rows.perp, rows.par, scratch);
    const expected = { perp: new Float64Array(grid.length), par: new Float64Array(grid.length) };
    addUniformBowBins(uniformBowTable(n, 2, grid, STEP_DEG), x, 1, expected.perp, expected.par);
    const total = Array.from(expected.perp, (v, j) => v + expected.par[j]);
    const peak = Math.max(...total);
    const miss = (row: { perp: Float64Array; par: Float64Array }) => Math.max(...total.map((v, j) => Math.abs(row.perp[j] + row.par[j] - v))) / peak;
    // Measured: 4.1e-4 of the peak with the tables blended (about what shifting one table costs, the test above: ẑ is
    // interpolated linearly between edges), 3.1e-2 with the rows blended. Bounds: 2e-3 (5× the measured) and 1e-2.
    expect(miss(tables)).toBeLessThanOrEqual(2e-3);
    expect(miss(rows)).toBeGreaterThan(1e-2);
    
  });
});
