import { describe, expect, it } from "vitest";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { PlaneTracer, RayPredictor } from "../../../lib/rays/plane-sweep.js";

describe("the search for the ray that leaves in the scattering plane", () => {
  // A 2 mm equilibrium drop canted 13° across a plane at the side of the bow (sun 20°, arc 60°): v*(u) ≠ 0 and bends.
  const tracer = new PlaneTracer(
    { outline: equilibriumOutline(1000), axis: cantedAxis(8, -10), n: 1.3337, maxOrder: 3, absorptionPerRadius: 0 },
    bowScatteringPlane(20, 60),
  );

  it("costs fewer traces from an extrapolated start than from the last ray's v", () => {
    const count = (fn: () => void) => {
      const original = tracer.traceAt;
      let traces = 0;
      tracer.traceAt = (u, v, p) => {
        traces++;
        return original.call(tracer, u, v, p);
      };
      fn();
      tracer.traceAt = original;
      return traces;
    };
    const half = tracer.pupilHalfWidth(1);
    const us = Array.from({ length: 200 }, (_, s) => half * 0.9 * Math.sin((Math.PI * s) / 400));
    const newton = count(() => {
      let v = 0;
      for (const u of us) v = tracer.planeRay(u, v, 2)?.v ?? v;
    });
    const predicted = count(() => {
      const predictor = new RayPredictor();
      us.forEach((u, s) => {
        const ray = tracer.planeRay(u, predictor.guess(s, 0), 2);
        if (ray) predictor.add(s, ray.v);
      });
    });
    // Measured: 3.0 traces a ray by Newton's steps from the last v, 2.0 with the predictor (on samples ~20× further apart than a sweep's).
    expect(predicted).toBeLessThan(0.8 * newton);
  });
});

describe("the start of the next search", () => {
  it("extrapolates a quadratic in the sample index exactly (Press et al. 2007 §3.2: the interpolant is unique)", () => {
    const predictor = new RayPredictor();
    const v = (s: number) => 0.1 - 0.003 * s + 2e-5 * s * s;
    for (const s of [10, 11, 12]) predictor.add(s, v(s));
    expect(predictor.guess(13, 0)).toBeCloseTo(v(13), 14);
    expect(predictor.guess(14, 0)).toBeCloseTo(v(14), 14);
    // Beyond its reach (2 samples) the last ray's v is the guess; before any ray, the fallback.
    expect(predictor.guess(20, 0)).toBe(v(12));
    predictor.reset();
    expect(predictor.guess(13, 0.5)).toBe(0.5);
  });
});
