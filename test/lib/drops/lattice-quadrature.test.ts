import { describe, it, expect } from "vitest";
import { latticeRadiusQuadrature, latticeRadiusUm, DEFAULT_THINNING } from "../../../lib/drops/lattice-quadrature.js";
import { radiusMoment } from "../../../lib/drops/distributions.js";
import type { DropSizeDistribution } from "../../../lib/drops/distributions.js";

const cases: [string, DropSizeDistribution][] = [
  ["Marshall–Palmer 2 mm/h", { kind: "marshall-palmer", rainRateMmPerH: 2 }],
  ["lognormal 10 µm", { kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.4, totalNumberPerM3: 1e8 }],
  ["gamma D0 = 1 mm, μ = 2", { kind: "gamma-d0", medianVolumeDiameterMm: 1, mu: 2, totalNumberPerM3: 1000 }],
  ["histogram", { kind: "histogram", edgesUm: [50, 80, 130, 400], numberPerM3: [100, 60, 5] }],
];

describe("lattice radius quadrature", () => {
  it.each(cases)("%s: nodes lie on the shared lattice", (_name, dist) => {
    const q = latticeRadiusQuadrature(dist);
    for (const r of q.radiiUm) {
      const i = Math.log10(r) * 64;
      expect(Math.abs(i - Math.round(i))).toBeLessThan(1e-9);
      expect(latticeRadiusUm(Math.round(i), 64)).toBeCloseTo(r, 9);
    }
  });

  it.each(cases)("%s: integrates the cross-section moment ∫r²n(r)dr within 1e-3", (_name, dist) => {
    // Exact moments: Euler's gamma integral for Marshall–Palmer/gamma (Marshall & Palmer 1948; Ulbrich 1983),
    // the lognormal moment formula, and piecewise-constant bins. 1e-3 = the 1e-4 tail left out plus the
    // midpoint rule's error at 64 nodes per decade.
    const q = latticeRadiusQuadrature(dist);
    let sum = 0;
    q.radiiUm.forEach((r, i) => (sum += q.weights[i] * r * r));
    expect(Math.abs(sum / radiusMoment(dist, 2) - 1)).toBeLessThan(1e-3);
  });
});

describe("thinning the lattice where drops carry little of the cross-section", () => {
  it.each(cases)("%s: keeps the fine quadrature's cross-section exactly and every node above 1/8 of the peak", (_name, dist) => {
    const fine = latticeRadiusQuadrature(dist, { thinning: [] });
    const thin = latticeRadiusQuadrature(dist);
    const cross = (q: typeof fine) => q.radiiUm.reduce((s, r, i) => s + q.weights[i] * r * r, 0);
    expect(Math.abs(cross(thin) / cross(fine) - 1)).toBeLessThan(1e-12);
    const peak = Math.max(...fine.radiiUm.map((r, i) => fine.weights[i] * r * r));
    const kept = new Set(thin.radiiUm);
    fine.radiiUm.forEach((r, i) => {
      if (fine.weights[i] * r * r >= DEFAULT_THINNING[0].belowPeakShare * peak) expect(kept.has(r)).toBe(true);
    });
    // Merged nodes sit on the lattice at multiples of their stride.
    for (const r of thin.radiiUm) {
      const i = Math.round(Math.log10(r) * 64);
      if (!fine.radiiUm.includes(r)) expect(i % 3).toBe(0);
    }
  });

  it("leaves a single drop size at its own radius", () => {
    const q = latticeRadiusQuadrature({ kind: "monodisperse", radiusUm: 152, totalNumberPerM3: 10 });
    expect(Array.from(q.radiiUm)).toEqual([152]);
    expect(Array.from(q.weights)).toEqual([10]);
  });

  it("Marshall–Palmer 2 mm/h: the drops below 100 µm (3.6 % of the cross-section) get under a third of the fine nodes", () => {
    // Share below 100 µm from the exponential law (Marshall & Palmer 1948): 1 − e^−x(1 + x + x²/2), x = Λ·0.2 mm.
    const dist: DropSizeDistribution = { kind: "marshall-palmer", rainRateMmPerH: 2 };
    const small = (q: ReturnType<typeof latticeRadiusQuadrature>) => q.radiiUm.filter((r) => r < 100).length;
    const fine = latticeRadiusQuadrature(dist, { thinning: [] });
    const thin = latticeRadiusQuadrature(dist);
    expect(small(thin)).toBeLessThan(small(fine) / 3);
    expect(thin.radiiUm.length).toBeLessThan(fine.radiiUm.length * 0.6);
  });
});
