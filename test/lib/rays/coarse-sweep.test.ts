import { describe, expect, it } from "vitest";
import { sweepPlaneCoarse, type CoarseSweepCount } from "../../../lib/rays/coarse-sweep.js";
import { PlaneTracer, sweepPlane } from "../../../lib/rays/plane-sweep.js";
import { AMPLITUDE_TOLERANCE, PATH_TOLERANCE, THETA_TOLERANCE_RAD } from "../../../lib/rays/sweep-interpolation.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { deviationRad, scatteringAngleOfDeviation } from "../../../lib/rays/descartes.js";
import { SHAPED_COARSE_STEP, SHAPED_HALF_SEGMENTS } from "../../../lib/bow/shaped-plane-rows.js";

const N_WATER = 1.3337;

describe("a plane sweep traced every few samples and filled by cubics", () => {
  it("equals the full sweep on a tilted, flattened drop, both sides, orders 0–3, within the fill's tolerances", () => {
    // 2 mm equilibrium drop (axis ratio 0.93) canted 13° out of a plane at arc 30°, sun 15°: v*(u) bends, amplitudes
    // mix polarisations, and the secondary's rays end inside the pupil (the ok transitions the fill must not cross).
    const tracer = new PlaneTracer(
      { outline: equilibriumOutline(1000), axis: cantedAxis(7.5, 10.6), n: N_WATER, maxOrder: 3, absorptionPerRadius: 0 },
      bowScatteringPlane(15, 30),
    );
    const count: CoarseSweepCount = { traced: 0, filled: 0 };
    for (const p of [0, 1, 2, 3]) {
      const full = sweepPlane(tracer, p, SHAPED_HALF_SEGMENTS);
      const fast = sweepPlaneCoarse(tracer, p, SHAPED_HALF_SEGMENTS, SHAPED_COARSE_STEP, undefined, count);
      let rays = 0;
      for (let s = 0; s < full.u.length; s++) {
        expect(fast.u[s]).toBe(full.u[s]);
        // The same rays leave in the plane: no run of rays is cut short or lost.
        expect(fast.ok[s]).toBe(full.ok[s]);
        if (!full.ok[s]) continue;
        rays++;
        // The error estimate is the next term of Newton's form, which bounds the cubic's error up to a factor of
        // order one where the quantity is smooth (Press et al. 2007 §3.2): twice the tolerance leaves room for that.
        expect(Math.abs(fast.thetaSigned[s] - full.thetaSigned[s])).toBeLessThan(2 * THETA_TOLERANCE_RAD);
        expect(Math.abs(fast.path[s] - full.path[s])).toBeLessThan(2 * PATH_TOLERANCE);
        expect(Math.abs(fast.offset[s] - full.offset[s])).toBeLessThan(2 * PATH_TOLERANCE);
        const amplitude = Math.max(Math.abs(full.perpAmp[s]), Math.abs(full.parAmp[s]), Math.abs(full.perpCross[s]), Math.abs(full.parCross[s]));
        for (const field of ["perpAmp", "parAmp", "perpCross", "parCross"] as const) {
          expect(Math.abs(fast[field][s] - full[field][s])).toBeLessThan(2 * AMPLITUDE_TOLERANCE * amplitude + 1e-12);
        }
        expect(fast.perpPerU[s]).toBe(fast.perpAmp[s] ** 2 + fast.perpCross[s] ** 2);
      }
      expect(rays).toBeGreaterThan(1000);
    }
    // Most samples are filled, not traced.
    expect(count.filled).toBeGreaterThan(2 * count.traced);
  }, 600_000);

  it("through a sphere gives Descartes' scattering angle at every sample, traced or filled, within 1e-9 rad (van de Hulst 1957 §12.2)", () => {
    // A spheroid of axis ratio 1 canted in a general plane: the 3D tracer's sweep at b = |u| is Descartes' ray.
    const tracer = new PlaneTracer({ outline: spheroidOutline(1), axis: cantedAxis(15, -5), n: N_WATER, maxOrder: 3, absorptionPerRadius: 0 }, bowScatteringPlane(20, 37));
    for (const p of [2, 3]) {
      const count: CoarseSweepCount = { traced: 0, filled: 0 };
      const sweep = sweepPlaneCoarse(tracer, p, SHAPED_HALF_SEGMENTS, SHAPED_COARSE_STEP, undefined, count);
      let checked = 0;
      for (let s = 0; s < sweep.u.length; s++) {
        const b = Math.abs(sweep.u[s]);
        if (b >= 1) continue;
        expect(sweep.ok[s]).toBe(1);
        const expected = scatteringAngleOfDeviation(deviationRad(N_WATER, p - 1, b)).angle;
        expect(Math.abs(Math.abs(sweep.thetaSigned[s]) - expected)).toBeLessThan(1e-9 + THETA_TOLERANCE_RAD);
        checked++;
      }
      expect(checked).toBeGreaterThan(7900);
      expect(count.filled).toBeGreaterThan(count.traced);
    }
  }, 600_000);
});
