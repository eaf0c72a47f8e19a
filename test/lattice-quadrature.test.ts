import { describe, it, expect } from "vitest";
import { latticeRadiusQuadrature, latticeRadiusUm } from "../lib/drops/lattice-quadrature.js";
import { radiusMoment } from "../lib/drops/distributions.js";
import type { DropSizeDistribution } from "../lib/drops/distributions.js";

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
