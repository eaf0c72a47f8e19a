import { describe, expect, it } from "vitest";
import { contextFromSweeps, shapedPlaneContext, shapedPlaneRow, shapedPlaneSweeps } from "../../../lib/bow/shaped-plane-rows.js";
import { rayOpticsBins } from "../../../lib/bow/ray-bins.js";
import { addUniformBowBins, uniformBowTable } from "../../../lib/bow/airy-bins.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { descartesRay } from "../../../lib/rays/descartes.js";
import { PlaneTracer, sweepPlane } from "../../../lib/rays/plane-sweep.js";
import { findFold } from "../../../lib/bow/plane-bow-table.js";
import { allocateTrace, AT, ORDER_STRIDE, traceDrop } from "../../../lib/rays/shape-tracer.js";
import { bowAngle2d } from "../../helpers/outline-trace-2d.js";

const DEG = Math.PI / 180;
const N_WATER = 1.3337;

function grid(fromDeg: number, toDeg: number, stepDeg: number): Float64Array {
  const count = Math.round((toDeg - fromDeg) / stepDeg);
  return Float64Array.from({ length: count }, (_, j) => fromDeg + stepDeg / 2 + j * stepDeg);
}

/** Today's sphere engine for orders 0–3, composed as lib/bow/drop-rows.ts composes its "airy" engine. */
function sphereRow(n: number, thetaDeg: Float64Array, stepDeg: number, x: number): Float64Array {
  const rays = rayOpticsBins(n, [0, 1], thetaDeg, stepDeg);
  const tables = [2, 3].map((p) => uniformBowTable(n, p, thetaDeg, stepDeg));
  tables.forEach((t, o) => {
    const all = rayOpticsBins(n, [o + 2], thetaDeg, stepDeg);
    for (let j = 0; j < thetaDeg.length; j++) {
      rays.perpendicular[j] += t.uniform[j] ? t.otherPerp[j] : all.perpendicular[j];
      rays.parallel[j] += t.uniform[j] ? t.otherPar[j] : all.parallel[j];
    }
  });
  const perp = rays.perpendicular.map((v) => v * x * x);
  const par = rays.parallel.map((v) => v * x * x);
  for (const t of tables) addUniformBowBins(t, x, 1, perp, par);
  return perp.map((v, j) => v + par[j]);
}

function shapedRow(ctx: ReturnType<typeof shapedPlaneContext>, x: number): Float64Array {
  const perp = new Float64Array(ctx.raysPerX2.perpendicular.length);
  const par = new Float64Array(perp.length);
  shapedPlaneRow(ctx, x, perp, par);
  return perp.map((v, j) => v + par[j]);
}

/** Angle of the largest sample within [loDeg, hiDeg], refined by a parabola through it and its neighbours. */
function peakDeg(thetaDeg: Float64Array, values: Float64Array, loDeg: number, hiDeg: number): number {
  let best = -1;
  for (let j = 1; j + 1 < values.length; j++) {
    if (thetaDeg[j] < loDeg || thetaDeg[j] > hiDeg) continue;
    if (best < 0 || values[j] > values[best]) best = j;
  }
  const [a, b, c] = [values[best - 1], values[best], values[best + 1]];
  const step = thetaDeg[1] - thetaDeg[0];
  return thetaDeg[best] + (0.5 * step * (a - c)) / (a - 2 * b + c);
}

describe("ray optics with Airy-type bows through flattened drops: the sphere limit", () => {
  // A spheroid of axis ratio 1 is the sphere; its axis is canted and the plane general (sun 20°, arc 37°) so that
  // every code path of the 3D tracer runs. The reference is today's sphere engine (ray-bins.ts, airy-bins.ts).
  const thetaDeg = grid(120, 150, 0.05);
  const ctx = shapedPlaneContext(
    { outline: spheroidOutline(1), axis: cantedAxis(20, -10), n: N_WATER },
    bowScatteringPlane(20, 37),
    1,
    thetaDeg,
    0.05,
  );
  it.each([3000, 20000])("x = %s: profiles within 1e-3 relative and bow peaks within 0.01° (issue 13's check)", (x) => {
    const mine = shapedRow(ctx, x);
    const sphere = sphereRow(N_WATER, thetaDeg, 0.05, x);
    // Measured worst: 3.3e-4 (x = 3000) and 1.2e-4 (x = 20 000), in the bin that holds the secondary's geometric angle.
    let worst = 0;
    mine.forEach((v, j) => (worst = Math.max(worst, Math.abs(v / sphere[j] - 1))));
    expect(worst).toBeLessThanOrEqual(1e-3);
    const primary = descartesRay(N_WATER, 1).scatteringAngleDeg;
    const secondary = descartesRay(N_WATER, 2).scatteringAngleDeg;
    for (const [lo, hi] of [
      [primary, primary + 3],
      [secondary - 3, secondary],
    ]) {
      expect(Math.abs(peakDeg(thetaDeg, mine, lo, hi) - peakDeg(thetaDeg, sphere, lo, hi))).toBeLessThanOrEqual(0.01);
    }
  });
});

describe("flattened drops: geometry that can be derived independently", () => {
  it("sun on the horizon, arc position 90°: the horizontal scattering plane meets the drop in a circle, so the geometric bows are Descartes' and the wave peaks the sphere's within 0.05°", () => {
    // Light in the horizontal plane through the drop's widest section meets walls whose normals are horizontal
    // (the outline's tangent is vertical there), so those rays stay in the plane and see a circle of radius
    // r_max: Descartes' angles hold exactly (scale-free); the peaks move only by the Airy scale x^(−2/3) of
    // r_max instead of a (≈ 0.005° for x ≈ 10⁴). D = 4 mm (axis ratio 0.77), x for λ = 550 nm.
    // The section's bows are the sweeps' own runs; their branches (other roots v*(u): lib/rays/fold-back.ts,
    // lib/rays/lost-roots.ts) are rays that leave the section and come back into the plane, focused by the drop's
    // vertical curvature: for this drop they make a caustic of their own at Θ ≈ 139.4°, brighter than the primary's
    // Airy peak in 0.02° bins, which brute force over the pupil confirms in ray optics (bench/in-plane-brute.ts, n 1.3338, 0.5° bins
    // at 139.25° and 139.75°: 9.1 and 11.0 against the primary's 6.3 at 138.25°). The check is on the section's bows.
    const outline = equilibriumOutline(2000);
    const plane = bowScatteringPlane(0, 90);
    const thetaDeg = grid(125, 141, 0.02);
    const setup = { outline, axis: [0, 0, 1] as const, n: N_WATER };
    const sweeps = shapedPlaneSweeps([setup], plane, 1, thetaDeg, 0.02)[0].map((sweep) => sweep && { ...sweep, branches: [] });
    const ctx = contextFromSweeps(N_WATER, sweeps, 1, thetaDeg, 0.02);
    const folds = new Map(ctx.folds.map((f) => [f.order, f.fold.thetaR / DEG]));
    expect(Math.abs(folds.get(2)! - descartesRay(N_WATER, 1).scatteringAngleDeg)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(folds.get(3)! - descartesRay(N_WATER, 2).scatteringAngleDeg)).toBeLessThanOrEqual(1e-6);
    const x = (2 * Math.PI * 2000) / 0.55;
    const mine = shapedRow(ctx, x);
    const sphere = sphereRow(N_WATER, thetaDeg, 0.02, x);
    const primary = descartesRay(N_WATER, 1).scatteringAngleDeg;
    const secondary = descartesRay(N_WATER, 2).scatteringAngleDeg;
    expect(Math.abs(peakDeg(thetaDeg, mine, primary, primary + 2) - peakDeg(thetaDeg, sphere, primary, primary + 2))).toBeLessThanOrEqual(0.05);
    expect(Math.abs(peakDeg(thetaDeg, mine, secondary - 2, secondary) - peakDeg(thetaDeg, sphere, secondary - 2, secondary))).toBeLessThanOrEqual(0.05);
  }, 600_000);

  it("arc position 0° (top) and 180° (bottom): the bow angles equal a 2D ray trace through the drop's vertical outline", () => {
    // D = 2 mm (axis ratio 0.93): both the top and the bottom of both bows are still formed in the vertical plane.
    const outline = equilibriumOutline(1000);
    const sunDeg = 10;
    const plane = bowScatteringPlane(sunDeg, 0);
    const tracer = new PlaneTracer({ outline, axis: [0, 0, 1], n: N_WATER, maxOrder: 3, absorptionPerRadius: 0 }, plane);
    for (const p of [2, 3]) {
      const sweep = sweepPlane(tracer, p, 1000);
      for (const side of [1, -1] as const) {
        const near = descartesRay(N_WATER, p - 1).scatteringAngleDeg;
        const fold = findFold(sweep, side, near * DEG)!;
        const reference = bowAngle2d(outline, N_WATER, sunDeg, p, side, near);
        // Both solve the same geometry by different means (3D implicit surface vs 2D parametric outline):
        // agreement to 1e-5° is far below anything visible.
        expect(Math.abs(fold.thetaR / DEG - reference)).toBeLessThanOrEqual(1e-5);
      }
    }
  }, 600_000);
});


describe("energy: a flattened, tilted, absorbing drop scatters all it intercepts less what it absorbs", () => {
  it("Σ over rays and orders of the power leaving + absorbed = intercepted, within 1e-3; the intercepted area is the spheroid's shadow", () => {
    const q = 0.7;
    const outline = spheroidOutline(q);
    const axis = cantedAxis(15, 5);
    const setup = { outline, axis, n: N_WATER, absorptionPerRadius: 0.05, maxOrder: 40 };
    const dIn = [Math.cos(25 * DEG), 0, -Math.sin(25 * DEG)] as const;
    // Pupil basis ⟂ dIn.
    const e1 = [0, 1, 0] as const;
    const e2 = [dIn[1] * e1[2] - dIn[2] * e1[1], dIn[2] * e1[0] - dIn[0] * e1[2], dIn[0] * e1[1] - dIn[1] * e1[0]] as const;
    const trace = allocateTrace(setup.maxOrder);
    const cells = 120;
    const half = outline.maxRadius * 1.01;
    const cell = (2 * half) / cells;
    let intercepted = 0;
    let scattered = 0;
    let absorbed = 0;
    for (let i = 0; i < cells; i++) {
      for (let j = 0; j < cells; j++) {
        const a = -half + (i + 0.5) * cell;
        const b = -half + (j + 0.5) * cell;
        const o = [0, 1, 2].map((c) => a * e1[c] + b * e2[c] - 5 * dIn[c]);
        traceDrop(setup, o, dIn, e1, e2, trace);
        if (!trace.hit) continue;
        intercepted += 2;
        for (let p = 0; p <= setup.maxOrder; p++) {
          const base = p * ORDER_STRIDE;
          if (!trace.orders[base + AT.valid]) continue;
          for (let c = 0; c < 12; c++) scattered += trace.orders[base + AT.e1Re + c] ** 2;
        }
        absorbed += trace.absorbed[0] + trace.absorbed[1];
      }
    }
    expect(absorbed / intercepted).toBeGreaterThan(0.01);
    expect(Math.abs((scattered + absorbed) / intercepted - 1)).toBeLessThanOrEqual(1e-3);

    // The shadow of a spheroid with semi-axes A, A, C seen at γ from its axis is an ellipse of area
    // π·A·√(A²cos²γ + C²sin²γ) (orthogonal projection, common practice); rim found by bisection on 720 azimuths.
    const A = q ** (-1 / 3);
    const C = q ** (2 / 3);
    const cosG = Math.abs(dIn[0] * axis[0] + dIn[1] * axis[1] + dIn[2] * axis[2]);
    const expected = Math.PI * A * Math.sqrt(A * A * cosG * cosG + C * C * (1 - cosG * cosG));
    let area = 0;
    const azimuths = 720;
    for (let k = 0; k < azimuths; k++) {
      const phi = (2 * Math.PI * k) / azimuths;
      let lo = 0;
      let hi = half;
      for (let it = 0; it < 50; it++) {
        const mid = 0.5 * (lo + hi);
        const o = [0, 1, 2].map((c) => mid * (Math.cos(phi) * e1[c] + Math.sin(phi) * e2[c]) - 5 * dIn[c]);
        if (traceDrop({ ...setup, maxOrder: 0 }, o, dIn, e1, e2, trace).hit) lo = mid;
        else hi = mid;
      }
      area += (0.5 * lo * lo * 2 * Math.PI) / azimuths;
    }
    expect(Math.abs(area / expected - 1)).toBeLessThanOrEqual(1e-4);
  }, 600_000);
});
