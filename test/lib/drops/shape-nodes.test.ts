import { describe, expect, it } from "vitest";
import { equilibriumDeformation, shapeNodeWeights } from "../../../lib/drops/shape/shape-nodes.js";

// The radius nodes of a Marshall–Palmer 2 mm/h profile span these (150 µm to 2.4 mm, lib/drops/lattice-quadrature.ts).
const RADII_UM = [150, 205, 305, 437, 562, 750, 1000, 1241, 1715, 2371, 4000];

describe("equilibrium drops blended from shape nodes evenly spaced in deformation", () => {
  it("step 0 keeps every radius its own shape", () => {
    for (const r of RADII_UM) expect(shapeNodeWeights(r, 0)).toEqual([{ radiusUm: r, weight: 1 }]);
  });

  it("the two nodes bracket the drop's deformation, lie on the grid k·step (to 1e-10), and their linear weights give it back", () => {
    for (const step of [0.002, 0.005]) {
      for (const r of RADII_UM) {
        const nodes = shapeNodeWeights(r, step);
        const own = equilibriumDeformation(r);
        const defs = nodes.map((n) => equilibriumDeformation(n.radiusUm));
        defs.forEach((d) => expect(Math.abs(d - step * Math.round(d / step))).toBeLessThanOrEqual(1e-10));
        expect(nodes.reduce((s, n) => s + n.weight, 0)).toBeCloseTo(1, 12);
        expect(Math.abs(nodes.reduce((s, n, k) => s + n.weight * defs[k], 0) - own)).toBeLessThanOrEqual(1e-9);
        if (nodes.length === 2) {
          expect(defs[0]).toBeLessThanOrEqual(own + 1e-10);
          expect(defs[1]).toBeGreaterThanOrEqual(own - 1e-10);
          expect(defs[1] - defs[0]).toBeCloseTo(step, 9);
        }
      }
    }
  });

  it("radii share nodes: 60 radii from 150 µm to 2.4 mm (deformation up to 0.28) need at most 0.28 / 0.02 + 1 nodes of step 0.02", () => {
    const radii = Array.from({ length: 60 }, (_, i) => 150 * 1.048 ** i);
    const shapes = new Set(radii.flatMap((r) => shapeNodeWeights(r, 0.02).map((n) => n.radiusUm)));
    expect(equilibriumDeformation(radii[59])).toBeLessThan(0.3);
    expect(shapes.size).toBeLessThanOrEqual(16);
  });

  it("deformation grows with radius over the table's range (what the nodes' root search relies on)", () => {
    let last = -1;
    for (let r = 50; r <= 4500; r += 50) {
      const d = equilibriumDeformation(r);
      expect(d).toBeGreaterThan(last);
      last = d;
    }
  });
});
