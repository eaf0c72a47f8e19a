import { describe, expect, it } from "vitest";
import { alignedCantingMean, foldOverTilt, foldSpreadKernel, shiftBinMeans } from "../../../lib/bow/canting-spread.js";
import { cantingNodesFive } from "../../../lib/drops/shape/canting.js";

describe("shifting bin means", () => {
  it("moves a row by whole bins exactly and by part of a bin as the linear interpolant through the bin centres", () => {
    const row = Float64Array.from([0, 1, 4, 9, 16, 25]);
    const out = new Float64Array(row.length);
    shiftBinMeans(row, 0, out);
    expect(Array.from(out)).toEqual(Array.from(row));
    shiftBinMeans(row, 2, out);
    expect(Array.from(out)).toEqual([0, 0, 0, 1, 4, 9]);
    shiftBinMeans(row, -0.5, out);
    // Half-way between neighbouring centres (the last held at its end value).
    expect(Array.from(out)).toEqual([0.5, 2.5, 6.5, 12.5, 20.5, 25]);
  });
});

describe("the spread of the bow over the canting", () => {
  const sd = 7.5;
  const nodes = cantingNodesFive(sd);
  const a = Math.sqrt(3) * sd;

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

  it("is one weight at no shift when every node's fold is the same (spheres), and a Gaussian of σ·|∇Θ_R| for a linear fold", () => {
    const still = foldSpreadKernel({ c: 40, gx: 0, gy: 0, hx: 0, hy: 0 }, sd, 0.05);
    expect(still.first).toBe(0);
    expect(still.weights[0]).toBeCloseTo(1, 13);
    expect(still.weights.slice(1).every((w) => w === 0)).toBe(true);
    // Θ_R linear in the tilt: δ = g·t is normal with σ_δ = σ·|g| (a linear map of a normal variable: common practice).
    // The linear split between bins adds the variance of a uniform bin, 1/6 of a bin² (a triangle of half-width one bin).
    const g = { gx: 0.12, gy: -0.05 };
    const step = 0.05;
    const { first, weights } = foldSpreadKernel({ c: 40, ...g, hx: 0, hy: 0 }, sd, step);
    let sum = 0, mean = 0, second = 0;
    weights.forEach((w, m) => {
      const shiftDeg = (first + m) * step;
      sum += w;
      mean += w * shiftDeg;
      second += w * shiftDeg * shiftDeg;
    });
    const expected = sd * sd * (g.gx ** 2 + g.gy ** 2) + (step * step) / 6;
    expect(sum).toBeCloseTo(1, 12);
    expect(Math.abs(mean)).toBeLessThan(1e-9);
    expect(Math.abs(second - mean * mean - expected) / expected).toBeLessThan(1e-3);
  });

  it("leaves the nodes' sum as it is when every fold is the same, and otherwise moves each node's bow onto the upright node's before the spread", () => {
    const count = 200;
    const bump = (centreBin: number) => Float64Array.from({ length: count }, (_, j) => Math.exp(-(((j - centreBin) / 3) ** 2)));
    const step = 0.05;
    const shareOf = [0, 1, 2, 3, 4];
    const same = nodes.map((n) => bump(100).map((v) => v * n.weight));
    const out = new Float64Array(count);
    expect(alignedCantingMean(same, shareOf, nodes, [141, 141, 141, 141, 141], sd, step, out)).toBe(true);
    const plain = same.reduce((s, r) => s.map((v, j) => v + r[j]), new Float64Array(count));
    for (let j = 0; j < count; j++) expect(out[j]).toBeCloseTo(plain[j], 12);
    // Nodes whose bows sit 1° apart in tilt x and not at all in y: with the quadratic's tails (none here: linear), the
    // mean is the upright bump spread by a normal of σ·|g| = 7.5 × (1°/13°) ≈ 0.58°, whose peak falls accordingly.
    const folds = nodes.map((n) => 141 + (n.tiltXDeg / a) * 1);
    const moved = nodes.map((n, k) => bump(100 + (folds[k] - 141) / step).map((v) => v * n.weight));
    expect(alignedCantingMean(moved, shareOf, nodes, folds, sd, step, out)).toBe(true);
    const sigmaBins = (sd / a) / step;
    const widened = Math.sqrt(3 * 3 / 2 + sigmaBins * sigmaBins + 1 / 6);
    // A Gaussian bump of σ₀ = 3/√2 bins convolved with a normal of σ bins: peak × σ₀/√(σ₀² + σ²) (common practice).
    expect(Math.max(...out)).toBeCloseTo((3 / Math.sqrt(2)) / widened, 2);
    expect(out.indexOf(Math.max(...out))).toBe(100);
  });
});
