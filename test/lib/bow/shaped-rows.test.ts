import { describe, expect, it } from "vitest";
import { shapedDropRow, type ShapedRowSpec } from "../../../lib/bow/shaped-rows.js";

const thetaDeg = Float64Array.from({ length: 60 }, (_, j) => 136.05 + 0.1 * j);
const N_WATER = 1.3337;

function row(spec: ShapedRowSpec, x: number, radiusUm: number): number[] {
  const perp = new Float64Array(thetaDeg.length);
  const par = new Float64Array(thetaDeg.length);
  shapedDropRow(spec, N_WATER, x, radiusUm, thetaDeg, 0.1, perp, par);
  return Array.from(perp, (v, j) => v + par[j]);
}

describe("flattened-drop rows share their traced planes where the shape is the same", () => {
  const base = { cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 0, rayOnly: false };
  const spheroid: ShapedRowSpec = { ...base, kind: "spheroid", axisRatio: 0.9 };
  const equilibrium: ShapedRowSpec = { ...base, kind: "equilibrium" };

  it("a spheroid's row for a second radius, from the shared planes, equals the same row computed afresh", () => {
    row(spheroid, 3000, 500);
    const shared = row(spheroid, 5000, 900);
    // Another shape in between: the spheroid's planes are traced again.
    row(equilibrium, 5000, 900);
    const fresh = row(spheroid, 5000, 900);
    expect(shared).toEqual(fresh);
  }, 600_000);

  it("equilibrium drops of two radii are two shapes: same x, different rows", () => {
    const small = row(equilibrium, 5000, 500);
    const large = row(equilibrium, 5000, 900);
    const differs = small.some((v, j) => Math.abs(v / large[j] - 1) > 1e-2);
    expect(differs).toBe(true);
  }, 600_000);
});
