import { describe, expect, it } from "vitest";
import { foldOverTilt, localCantingMean, localSpreadKernels } from "../../../lib/bow/canting-spread.js";
import { cantingNodesFive } from "../../../lib/drops/shape/canting.js";

describe("the spread of the bow over the canting", () => {
  const sd = 7.5;
  const nodes = cantingNodesFive(sd);
  const a = Math.sqrt(3) * sd;
  const step = 0.05;
  const moments = ({ first, weights }: { first: number; weights: Float64Array }) => {
    let sum = 0, mean = 0;
    weights.forEach((w, m) => {
      sum += w;
      mean += w * (first + m) * step;
    });
    return { sum, mean };
  };

  it("takes the quadratic through the five nodes' folds", () => {
    // Θ_R = 40 + 0.1·tx − 0.05·ty + ½·0.004·tx² + ½·0.002·ty², sampled at the nodes, is found again exactly.
    const truth = (tx: number, ty: number) => 40 + 0.1 * tx - 0.05 * ty + 0.5 * 0.004 * tx * tx + 0.5 * 0.002 * ty * ty;
    const model = foldOverTilt(nodes, nodes.map((n) => truth(n.tiltXDeg, n.tiltYDeg)))!;
    expect(model.c).toBeCloseTo(40, 12);
    expect(model.gx).toBeCloseTo(0.1, 12);
    expect(model.gy).toBeCloseTo(-0.05, 12);
    expect(model.hx).toBeCloseTo(0.004, 12);
    expect(model.hy).toBeCloseTo(0.002, 12);
    expect(foldOverTilt(nodes, [40, 41, Number.NaN, 40, 40])).toBeNull();
    expect(a).toBeCloseTo(nodes[1].tiltXDeg, 12);
  });

  it("gives each node one weight at no shift when every fold is the same (spheres)", () => {
    for (const kernel of localSpreadKernels({ c: 40, gx: 0, gy: 0, hx: 0, hy: 0 }, nodes, sd, step)) {
      expect(kernel.first).toBe(0);
      expect(kernel.weights[0]).toBeCloseTo(1, 13);
      expect(kernel.weights.slice(1).every((w) => w === 0)).toBe(true);
    }
  });

  it("spreads each node over the folds of its own cell: for a fold linear in tilt x, the upright node symmetrically, the outer nodes inwards", () => {
    // Θ_R = 40 + g·tx. The centre's cell is |tx|, |ty| < a/2: symmetric, so its kernel's mean is 0. Node (+a, 0) holds
    // tx > a/2, where the Gaussian falls: its tilts lie below a on average, so its kernel's mean is g·(E[tx | cell] − a) < 0;
    // node (−a, 0) the mirror image. Nodes (0, ±a) see tx spread both ways: mean 0.
    const g = 0.2;
    const kernels = localSpreadKernels({ c: 40, gx: g, gy: 0, hx: 0, hy: 0 }, nodes, sd, step);
    const m = kernels.map(moments);
    for (const k of m) expect(k.sum).toBeCloseTo(1, 12);
    expect(Math.abs(m[0].mean)).toBeLessThan(1e-9);
    expect(m[1].mean).toBeLessThan(-0.1 * g * a * 0.1);
    expect(m[2].mean).toBeCloseTo(-m[1].mean, 9);
    expect(Math.abs(m[3].mean)).toBeLessThan(1e-9);
    // The spreads stay within what the Gaussian's ±5σ can reach: |g|·(5σ + a).
    for (const k of kernels) expect(Math.abs((k.first + k.weights.length) * step)).toBeLessThan(g * (5 * sd + a) + 2 * step);
  });

  it("has no comb where the fold moves bins apart between tilt samples: a continuous tilt through a linear map has a density without holes", () => {
    // Θ_R = 40 + 0.5·tx: tilt samples 0.25σ = 1.875° apart land 0.94°, about 19 bins, apart. Each node's kernel is the
    // distribution of 0.5·(tx − t_k) over its cell, a continuous density: every bin between its ends carries weight, and
    // neighbouring bins differ by a small fraction of the peak (no teeth one sample apart).
    const kernels = localSpreadKernels({ c: 40, gx: 0.5, gy: 0, hx: 0, hy: 0 }, nodes, sd, step);
    for (const { weights } of kernels) {
      const nonZero = [...weights.keys()].filter((m) => weights[m] > 0);
      const [lo, hi] = [nonZero[0], nonZero.at(-1)!];
      expect(hi - lo).toBeGreaterThan(40);
      const peak = Math.max(...weights);
      for (let m = lo + 1; m < hi; m++) {
        expect(weights[m]).toBeGreaterThan(0);
        expect(Math.abs(weights[m] - weights[m - 1])).toBeLessThan(0.15 * peak);
      }
      expect(moments({ first: 0, weights }).sum).toBeCloseTo(1, 12);
    }
  });

  it("leaves the nodes' sum as it is when every fold is the same, and widens and lowers a bow whose fold moves with the tilt", () => {
    const count = 200;
    const bump = (centreBin: number) => Float64Array.from({ length: count }, (_, j) => Math.exp(-(((j - centreBin) / 3) ** 2)));
    const shareOf = [0, 1, 2, 3, 4];
    // Both polarisations carry the same row here: the mean spreads each with the same kernels.
    const asShare = (row: Float64Array) => ({ perp: row, par: row.map((v) => 2 * v) });
    const same = nodes.map((n) => bump(100).map((v) => v * n.weight));
    const both = { perp: new Float64Array(count), par: new Float64Array(count) };
    const out = both.perp;
    expect(localCantingMean(same.map(asShare), shareOf, nodes, [141, 141, 141, 141, 141], sd, step, both)).toBe(true);
    for (let j = 0; j < count; j++) expect(both.par[j]).toBeCloseTo(2 * both.perp[j], 12);
    const plain = same.reduce((s, r) => s.map((v, j) => v + r[j]), new Float64Array(count));
    for (let j = 0; j < count; j++) expect(out[j]).toBeCloseTo(plain[j], 12);
    // Folds 1° apart per a of tilt x: each node's bump sits at its fold and is spread over its cell; the light is kept
    // (the sum over bins) and the peak falls below the narrow bumps' 1/3 + 2·1/6 at the centre.
    const folds = nodes.map((n) => 141 + n.tiltXDeg / a);
    const moved = nodes.map((n, k) => bump(100 + (folds[k] - 141) / step).map((v) => v * n.weight));
    expect(localCantingMean(moved.map(asShare), shareOf, nodes, folds, sd, step, both)).toBe(true);
    const light = (row: Float64Array) => row.reduce((s, v) => s + v, 0);
    expect(light(out)).toBeCloseTo(light(moved.reduce((s, r) => s.map((v, j) => v + r[j]), new Float64Array(count))), 6);
    const movedSum = moved.reduce((s, r) => s.map((v, j) => v + r[j]), new Float64Array(count));
    expect(Math.max(...out)).toBeLessThan(0.9 * Math.max(...movedSum));
    // Mirror images sharing one share: the merged share carries both weights and the mean is the same.
    const merged = [moved[0], moved[1], moved[2], moved[3].map((v, j) => v + moved[4][j])];
    const symmetric = nodes.map((n, k) => (k === 4 ? folds[3] : folds[k]));
    const twinBoth = { perp: new Float64Array(count), par: new Float64Array(count) };
    const singleBoth = { perp: new Float64Array(count), par: new Float64Array(count) };
    expect(localCantingMean(merged.map(asShare), [0, 1, 2, 3, 3], nodes, symmetric, sd, step, twinBoth)).toBe(true);
    expect(localCantingMean(moved.map(asShare), shareOf, nodes, symmetric, sd, step, singleBoth)).toBe(true);
    const [twin, single] = [twinBoth.perp, singleBoth.perp];
    for (let j = 0; j < count; j++) expect(twin[j]).toBeCloseTo(single[j], 12);
  });
});
