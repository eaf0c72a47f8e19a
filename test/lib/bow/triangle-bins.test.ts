// The spread of a pupil triangle's power over bins of Θ (lib/bow/triangle-bins.ts) against the triangle itself: a fine
// barycentric grid of points over it, each leaving at the vertices' angles interpolated linearly (the assumption of the
// spread), binned as points. The two agree to the grid's own resolution.
import { describe, expect, it } from "vitest";
import { depositOverTriangle } from "../../../lib/bow/triangle-bins.js";

/** Points of a barycentric grid over a triangle (each the centre of an equal-area sub-triangle), binned by their Θ. */
function sampled(a: number, b: number, c: number, fromDeg: number, stepDeg: number, count: number): Float64Array {
  const bins = new Float64Array(count);
  const m = 600;
  let total = 0;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m - i; j++) {
      // Upward and (where it exists) downward sub-triangles' centroids.
      const centres = [[(i + 1 / 3) / m, (j + 1 / 3) / m]];
      if (i + j < m - 1) centres.push([(i + 2 / 3) / m, (j + 2 / 3) / m]);
      for (const [s, t] of centres) {
        const theta = a + s * (b - a) + t * (c - a);
        const k = Math.floor((theta - fromDeg) / stepDeg);
        total++;
        if (k >= 0 && k < count) bins[k] += 1;
      }
    }
  }
  return bins.map((v) => v / total);
}

describe("the spread of a pupil triangle over Θ", () => {
  it("is the triangular distribution of its vertices' angles: the same bins as the triangle sampled finely, the whole energy kept", () => {
    const fromDeg = 130;
    const stepDeg = 0.05;
    for (const [a, b, c] of [[131.02, 131.4, 131.13], [130.5, 130.5, 132.2], [132.9, 131.7, 131.7], [129.9, 130.3, 130.1]]) {
      const bins = new Float64Array(80);
      const twice = new Float64Array(80);
      depositOverTriangle(bins, 1, twice, 2, a, b, c, fromDeg, stepDeg);
      for (let k = 0; k < 80; k++) expect(twice[k]).toBeCloseTo(2 * bins[k], 12);
      const reference = sampled(a, b, c, fromDeg, stepDeg, 80);
      for (let k = 0; k < 80; k++) expect(Math.abs(bins[k] - reference[k])).toBeLessThan(2e-3);
      const inside = reference.reduce((s, v) => s + v, 0);
      expect(bins.reduce((s, v) => s + v, 0)).toBeCloseTo(inside, 3);
    }
    // No width: all in the vertex's bin.
    const point = new Float64Array(10);
    depositOverTriangle(point, 2, new Float64Array(10), 1, 130.12, 130.12, 130.12, fromDeg, stepDeg);
    expect(point[2]).toBe(2);
  });
});
