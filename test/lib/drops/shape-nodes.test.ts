import { describe, expect, it } from "vitest";
import { equilibriumDeformation, shapeNodeRadiusUm } from "../../../lib/drops/shape/shape-nodes.js";

// The radius nodes of a Marshall–Palmer 2 mm/h profile span these (150 µm to 2.4 mm, lib/drops/lattice-quadrature.ts).
const RADII_UM = [150, 205, 305, 437, 562, 750, 1000, 1241, 1715, 2371, 4000];

describe("equilibrium drops gathered on shape nodes evenly spaced in deformation", () => {
  it("step 0 keeps every radius its own shape", () => {
    for (const r of RADII_UM) expect(shapeNodeRadiusUm(r, 0)).toBe(r);
  });

  it("a drop's node is within half a step of its deformation, and lies on the grid k·step (to 1e-10)", () => {
    for (const step of [0.002, 0.005]) {
      for (const r of RADII_UM) {
        const node = shapeNodeRadiusUm(r, step);
        const own = equilibriumDeformation(r);
        const nodeDef = equilibriumDeformation(node);
        expect(Math.abs(nodeDef - own)).toBeLessThanOrEqual(step / 2 + 1e-9);
        expect(Math.abs(nodeDef - step * Math.round(nodeDef / step))).toBeLessThanOrEqual(1e-10);
      }
    }
  });

  it("a node is its own node, and neighbouring small drops share one (fewer shapes than radii)", () => {
    const step = 0.003;
    for (const r of RADII_UM) {
      const node = shapeNodeRadiusUm(r, step);
      expect(shapeNodeRadiusUm(node, step)).toBe(node);
    }
    // Deformation grows about as D³ below 1 mm diameter (Pruppacher & Pitter 1971): 150–205 µm all lie below 0.0015.
    expect(shapeNodeRadiusUm(150, step)).toBe(shapeNodeRadiusUm(205, step));
    expect(shapeNodeRadiusUm(1000, step)).not.toBe(shapeNodeRadiusUm(1241, step));
  });

  it("deformation grows with radius over the table's range (what the nodes' bisection relies on)", () => {
    let last = -1;
    for (let r = 50; r <= 4500; r += 50) {
      const d = equilibriumDeformation(r);
      expect(d).toBeGreaterThan(last);
      last = d;
    }
  });
});
