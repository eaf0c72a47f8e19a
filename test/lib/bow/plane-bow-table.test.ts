import { describe, expect, it } from "vitest";
import { findFold, foldPair } from "../../../lib/bow/plane-bow-table.js";
import { SHAPED_HALF_SEGMENTS, shapedPlaneContext, shapedPlaneRow } from "../../../lib/bow/shaped-plane-rows.js";
import { leaveOneOutMiss } from "../../../lib/bow/aligned-blend.js";
import { chebyshevNodes } from "../../../lib/rays/sweep-interpolation.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { descartesRay } from "../../../lib/rays/descartes.js";
import { PlaneTracer, sweepPlane } from "../../../lib/rays/plane-sweep.js";

const DEG = Math.PI / 180;
const N_WATER = 1.3337;

describe("a bow's ray pairs read off the pupil sweep by cubic interpolation", () => {
  // A 2 mm drop canted 13° at the top of the bow (sun 10°): flattened and tilted, so Θ(u) is asymmetric about the
  // fold and the secondary meets total internal reflection near its fold (a kink in the amplitudes).
  const tracer = new PlaneTracer({ outline: equilibriumOutline(1000), axis: cantedAxis(13, 0), n: N_WATER, maxOrder: 3, absorptionPerRadius: 0 }, bowScatteringPlane(10, 0));

  it.each([2, 3])("order %s: each interpolated ray, traced again, leaves at its angle (1e-9 rad), with its path (1e-9 a) and amplitude (1e-3)", (p) => {
    const sweep = sweepPlane(tracer, p, SHAPED_HALF_SEGMENTS);
    const fold = findFold(sweep, 1, descartesRay(N_WATER, p - 1).scatteringAngleDeg * DEG)!;
    expect(fold).not.toBeNull();
    let pairs = 0;
    const worst = { angle: 0, path: 0, amplitude: 0 };
    // Every 0.01° over the first 4° of the lit side: where the table's two-ray bins are.
    for (let k = 1; k <= 400; k++) {
      const target = fold.thetaR + (fold.litAbove ? 1 : -1) * k * 0.01 * DEG;
      const pair = foldPair(sweep, 1, fold, target);
      if (pair === null) break;
      pairs++;
      for (const ray of pair) {
        const traced = tracer.planeRay(ray.u, 0, p, true)!;
        const w = 1 / Math.sqrt(Math.abs(traced.det));
        worst.angle = Math.max(worst.angle, Math.abs(traced.thetaSigned - target));
        worst.path = Math.max(worst.path, Math.abs(traced.path - ray.path));
        worst.amplitude = Math.max(worst.amplitude, Math.abs((traced.ampPerp * w) / ray.perp - 1), Math.abs((traced.ampPar * w) / ray.par - 1));
      }
    }
    expect(pairs).toBeGreaterThan(100);
    // Measured: angles 3e-13 (primary) and 4e-11 rad (secondary), paths alike; amplitudes 3e-6 and 4e-4, the latter
    // in the one cell that holds the kink of total internal reflection. A phase error x·1e-9 < 1e-4 rad for x < 1e5,
    // and 1e-3 of amplitude is 2e-3 of one bin's brightness: far below ΔE2000 0.5 (common practice: ~1 % in
    // luminance is about the smallest step seen).
    expect(worst.angle).toBeLessThanOrEqual(1e-9);
    expect(worst.path).toBeLessThanOrEqual(1e-9);
    expect(worst.amplitude).toBeLessThanOrEqual(1e-3);
  }, 600_000);
});

describe("a bow whose co-polar parallel amplitude changes sign at its fold (both polarisations' terms kept apart)", () => {
  // An upright 1 mm equilibrium drop half-way up the bow (arc 45°, sun 10°): the plane is no mirror plane of the drop,
  // so some incident ⟂ light leaves ∥ (cross-polar). The primary's internal reflection lies near Brewster's angle, where
  // the co-polar ∥ amplitude passes through zero (the bow's strong polarisation: Können 1985, Polarized Light in Nature,
  // from memory); at n = 1.333 it does so three samples from the fold.
  const plane = bowScatteringPlane(10, 45);
  const outline = equilibriumOutline(1000);
  const STEP = 0.05;
  const grid = Float64Array.from({ length: 200 }, (_, j) => 140 + STEP * (j + 0.5));
  const options = { rayOrders: [], bowOrders: [2] };
  const contextAt = (n: number) => shapedPlaneContext({ outline, axis: cantedAxis(0, 0), n }, plane, 1, grid, STEP, options);

  it("has fold constants smooth in n (leave-one-out miss < 1e-2) and a dark side that falls away from the fold (Airy 1838)", () => {
    const indices = [...chebyshevNodes(1.3138, 1.3511, 7)];
    const ctxs = indices.map(contextAt);
    for (const key of ["cPerp", "cPar", "dPerp", "dPar"] as const) {
      expect(leaveOneOutMiss(indices, ctxs.map((ctx) => ctx.folds[0].constants[key]))).toBeLessThan(1e-2);
    }
    const ctx = contextAt(1.333);
    const foldDeg = ctx.folds[0].fold.thetaR / DEG;
    const perp = new Float64Array(grid.length);
    const par = new Float64Array(grid.length);
    shapedPlaneRow(ctx, (2 * Math.PI * 1000) / 0.78, perp, par);
    const total = Array.from(perp, (v, j) => v + par[j]);
    const peakAt = total.indexOf(Math.max(...total));
    // Airy's bow (Airy 1838; van de Hulst 1957 §13.23): the first maximum lies on the lit side, and the dark side
    // decreases monotonically away from the fold. Measured: with one signed amplitude for both incident polarisations,
    // D∥ at n = 1.333 was 2.9e3 against 0.08 at its neighbours, and the bin at the fold 10× the first maximum.
    expect(grid[peakAt]).toBeGreaterThan(foldDeg);
    for (let j = 1; grid[j] + STEP / 2 < foldDeg; j++) expect(total[j]).toBeGreaterThan(total[j - 1]);
  });
});
