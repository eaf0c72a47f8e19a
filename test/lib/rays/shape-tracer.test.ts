import { describe, expect, it } from "vitest";
import { allocateTrace, AT, ORDER_STRIDE, traceDrop } from "../../../lib/rays/shape-tracer.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { cantedAxis } from "../../../lib/rays/bow-geometry.js";

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
