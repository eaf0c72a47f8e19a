import { describe, expect, it } from "vitest";
import { chebyshevNodes, interpolateSweep, lagrangeWeights } from "../../../lib/rays/sweep-interpolation.js";
import { shapedPlaneSweeps, shapedPlaneTracer } from "../../../lib/bow/shaped-plane-rows.js";
import { spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { deviationRad, scatteringAngleOfDeviation } from "../../../lib/rays/descartes.js";

const DEG = Math.PI / 180;

describe("Lagrange weights on Chebyshev nodes", () => {
  it("reproduce a polynomial of degree M − 1 exactly (Press et al. 2007 §3.2: the interpolant is unique)", () => {
    const nodes = chebyshevNodes(1.329, 1.343, 5);
    const f = (n: number) => 3 - 2 * n + 0.5 * n ** 2 - 7 * n ** 3 + n ** 4;
    for (const n of [1.329, 1.3312, 1.337, 1.343]) {
      const w = lagrangeWeights(nodes, n);
      const value = nodes.reduce((sum, nk, k) => sum + w[k] * f(nk), 0);
      expect(Math.abs(value - f(n))).toBeLessThan(1e-12);
    }
  });
  it("are the Chebyshev nodes of the first kind, inside the interval", () => {
    // cos((2k+1)π/2M) for M = 3: ±√3/2 and 0 (Press et al. 2007 Eq. 5.8.4).
    const nodes = chebyshevNodes(-1, 1, 3);
    expect(nodes[0]).toBeCloseTo(-Math.sqrt(3) / 2, 14);
    expect(nodes[1]).toBeCloseTo(0, 14);
    expect(nodes[2]).toBeCloseTo(Math.sqrt(3) / 2, 14);
  });
});

describe("a plane sweep interpolated across the refractive index", () => {
  it("through a sphere gives Descartes' scattering angle at every pupil sample, within 1e-9 rad (van de Hulst 1957 §12.2)", () => {
    // A spheroid of axis ratio 1 canted in a general plane: the 3D tracer's sweep at b = |u| is Descartes' ray.
    const setup = { outline: spheroidOutline(1), axis: cantedAxis(15, -5) };
    const plane = bowScatteringPlane(20, 37);
    const grid = Float64Array.from({ length: 100 }, (_, j) => 125.05 + 0.1 * j);
    const nodes = chebyshevNodes(1.3306, 1.3435, 5);
    const sweeps = shapedPlaneSweeps(nodes.map((n) => ({ ...setup, n })), plane, 1, grid, 0.1, { rayOrders: [], bowOrders: [2, 3] });
    for (const n of [1.3311, 1.3372, 1.3429]) {
      const tracer = shapedPlaneTracer({ ...setup, n }, plane, { rayOrders: [], bowOrders: [2, 3] });
      for (const p of [2, 3]) {
        // As lib/bow/shaped-rows.ts asks: samples are checked where their light comes within 2° of the grid.
        const near = { loRad: (125 - 2) * DEG, hiRad: (135 + 2) * DEG };
        const { sweep, traced } = interpolateSweep(sweeps.map((byOrder) => byOrder[p]!), nodes, n, tracer, near);
        let checked = 0;
        for (let s = 0; s < sweep.u.length; s++) {
          const b = Math.abs(sweep.u[s]);
          // Near grazing the deviation turns fast with b: those samples are traced at n, not interpolated.
          if (!sweep.ok[s] || b > 0.999) continue;
          const expected = scatteringAngleOfDeviation(deviationRad(n, p - 1, b)).angle;
          expect(Math.abs(Math.abs(sweep.thetaSigned[s]) - expected)).toBeLessThan(1e-9);
          checked++;
        }
        expect(checked).toBeGreaterThan(1000);
        // Measured: a few hundred of the ~8000 samples are traced at n (near the rim, where Θ turns fast with n).
        expect(traced).toBeLessThan(0.2 * sweep.u.length);
      }
    }
  }, 600_000);
});
