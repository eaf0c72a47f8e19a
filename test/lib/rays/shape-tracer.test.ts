import { describe, expect, it } from "vitest";
import { allocateTrace, AT, ORDER_STRIDE, traceDrop } from "../../../lib/rays/shape-tracer.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { unwrap } from "../../../lib/rays/plane-sweep.js";

const N_WATER = 1.3337;
const D_IN = [1, 0, 0];
const E1 = [0, 0, 1];
const E2 = [0, 1, 0];

describe("the 3D tracer's walls", () => {
  it("every wall a ray meets in a canted, flattened drop lies on the outline within 1e-13 of a (the roots' tolerance)", () => {
    const outline = equilibriumOutline(1500);
    const axis = cantedAxis(12, -7);
    const setup = { outline, axis, n: N_WATER, maxOrder: 3, absorptionPerRadius: 0 };
    const out = allocateTrace(3);
    let walls = 0;
    for (let k = 0; k < 400; k++) {
      // Impact points over the shadow, on a spiral out to the rim.
      const rho = outline.maxRadius * Math.sqrt((k + 0.5) / 400);
      const phi = 2.39996 * k;
      traceDrop(setup, [-3, rho * Math.cos(phi), rho * Math.sin(phi)], D_IN, E1, E2, out);
      if (!out.hit) continue;
      for (let p = 0; p <= 3; p++) {
        const at = p * ORDER_STRIDE;
        if (out.orders[at + AT.valid] !== 1) continue;
        const [x, y, z] = [out.orders[at + AT.point], out.orders[at + AT.point + 1], out.orders[at + AT.point + 2]];
        const len = Math.hypot(x, y, z);
        const mu = -(x * axis[0] + y * axis[1] + z * axis[2]) / len;
        expect(Math.abs(len - outline.radius(mu))).toBeLessThan(1e-13);
        walls++;
      }
    }
    expect(walls).toBeGreaterThan(1000);
  });

  it("through a sphere the far-field path of order p is 2(p·n·cos r − cos i) (van de Hulst 1957 §12.32), within 1e-12", () => {
    const setup = { outline: spheroidOutline(1), axis: cantedAxis(20, 5), n: N_WATER, maxOrder: 3, absorptionPerRadius: 0 };
    const out = allocateTrace(3);
    for (const b of [0, 0.3, 0.7, 0.86, 0.95, 0.999]) {
      traceDrop(setup, [-3, 0, b], D_IN, E1, E2, out);
      const cosI = Math.sqrt(1 - b * b);
      const cosR = Math.sqrt(1 - (b / N_WATER) ** 2);
      for (let p = 0; p <= 3; p++) {
        const path = out.orders[p * ORDER_STRIDE + AT.path];
        expect(Math.abs(path - 2 * (p * N_WATER * cosR - cosI))).toBeLessThan(1e-12);
      }
    }
  });
});

describe("the 3D tracer's ray differential", () => {
  it("each order's d(dir)/dv and d(point)/dv equal central differences of rays traced at v ± h, within 1e-6 (Y = d·N, Θ, path, offset)", () => {
    // Independent check: two more traces without the differential, h = 1e-6 (error ~h²·f‴/6 + ε/h: measured to fall as h²
    // from h = 1e-4 to 1e-5, worst 1.4e-8 relative at 1e-6 over 200 such rays). A 2 mm drop canted 13° across a plane at
    // the side of the bow; rays off the plane too (v ≠ 0).
    const setup = { outline: equilibriumOutline(1000), axis: cantedAxis(8, -10), n: N_WATER, maxOrder: 3, absorptionPerRadius: 0 };
    const { dIn, e } = bowScatteringPlane(20, 60);
    const cross = (a: readonly number[], b: readonly number[]) => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
    const dot = (a: ArrayLike<number>, b: ArrayLike<number>) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
    const normal = cross(dIn, e);
    const parallel = cross(normal, dIn);
    const out = allocateTrace(3);
    const exits = (u: number, v: number, withDifferential: boolean): (number[] | null)[] => {
      const o = [0, 1, 2].map((c) => u * e[c] + v * normal[c] - 4 * dIn[c]);
      traceDrop(setup, o, dIn, normal, parallel, out, withDifferential ? normal : null);
      return [0, 1, 2, 3].map((p) => {
        const base = p * ORDER_STRIDE;
        return out.hit && out.orders[base + AT.valid] === 1 ? Array.from(out.orders.subarray(base, base + ORDER_STRIDE)) : null;
      });
    };
    const theta = (d: ArrayLike<number>) => Math.atan2(dot(d, e), dot(d, dIn));
    const h = 1e-6;
    let compared = 0;
    for (let k = 0; k < 100; k++) {
      const u = setup.outline.maxRadius * Math.sin((Math.PI * k) / 201);
      const v = 0.05 * Math.sin(k);
      const ahead = exits(u, v + h, false);
      const behind = exits(u, v - h, false);
      const here = exits(u, v, true);
      for (let p = 0; p <= 3; p++) {
        const [a, b, d] = [ahead[p], behind[p], here[p]];
        if (!a || !b || !d) continue;
        const dirV = d.slice(AT.dirV, AT.dirV + 3);
        const pointV = d.slice(AT.pointV, AT.pointV + 3);
        const [dirA, dirB, dirD] = [a, b, d].map((r) => r.slice(AT.dir, AT.dir + 3));
        const [pointA, pointB, pointD] = [a, b, d].map((r) => r.slice(AT.point, AT.point + 3));
        // The far-field path W = L − d·P changes by −P·d_v (dL = d·dP at the exit: the eikonal's gradient is the ray);
        // the exit offset P·(N × d) by P_v·(N × d) + P·(N × d_v).
        const pathDifference = (a[AT.path] - b[AT.path]) / (2 * h);
        expect(Math.abs(-dot(pointD, dirV) - pathDifference)).toBeLessThan(1e-6 * Math.max(Math.abs(pathDifference), 1));
        const offsetOf = (point: number[], direction: number[]) => dot(point, cross(normal, direction));
        const offsetDifference = (offsetOf(pointA, dirA) - offsetOf(pointB, dirB)) / (2 * h);
        const offsetV = dot(pointV, cross(normal, dirD)) + dot(pointD, cross(normal, dirV));
        expect(Math.abs(offsetV - offsetDifference)).toBeLessThan(1e-6 * Math.max(Math.abs(offsetDifference), 1));
        const yvDifference = (dot(dirA, normal) - dot(dirB, normal)) / (2 * h);
        expect(Math.abs(dot(dirV, normal) - yvDifference)).toBeLessThan(1e-6 * Math.max(Math.abs(yvDifference), 1));
        const thetaV = (dot(dirD, dIn) * dot(dirV, e) - dot(dirD, e) * dot(dirV, dIn)) / (dot(dirD, e) ** 2 + dot(dirD, dIn) ** 2);
        const thetaVDifference = unwrap(theta(dirA) - theta(dirB)) / (2 * h);
        expect(Math.abs(thetaV - thetaVDifference)).toBeLessThan(1e-6 * Math.max(Math.abs(thetaVDifference), 1));
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(300);
  });
});
