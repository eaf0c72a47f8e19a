import { describe, expect, it } from "vitest";
import { shapedDropRow, shapedRows, type ShapedRowSpec } from "../../../lib/bow/shaped-rows.js";
import { shapedPlaneContext, shapedPlaneRow } from "../../../lib/bow/shaped-plane-rows.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";

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

  it("a spheroid's rows for two radii, computed together from one traced plane, equal each computed alone", () => {
    const together = shapedRows(spheroid, [{ radiusUm: 500, mRe: N_WATER, x: 3000 }, { radiusUm: 900, mRe: N_WATER, x: 5000 }], thetaDeg, 0.1);
    expect(Array.from(together[1].perp, (v, j) => v + together[1].par[j])).toEqual(row(spheroid, 5000, 900));
    expect(Array.from(together[0].perp, (v, j) => v + together[0].par[j])).toEqual(row(spheroid, 3000, 500));
  }, 600_000);

  it("equilibrium drops of two radii are two shapes: same x, different rows", () => {
    const small = row(equilibrium, 5000, 500);
    const large = row(equilibrium, 5000, 900);
    const differs = small.some((v, j) => Math.abs(v / large[j] - 1) > 1e-2);
    expect(differs).toBe(true);
  }, 600_000);
});

describe("a scattering plane traces only the part of the pupil whose light reaches the grid", () => {
  it("rows equal those of the whole pupil's sweep (1e-6 relative) for a flattened, canted drop at arc 45°", () => {
    // 2 mm drops canted 13° across the plane: v*(u) bends, several folds; the coarse look decides what is traced.
    const setup = { outline: equilibriumOutline(2000), axis: cantedAxis(0, 13), n: N_WATER };
    const plane = bowScatteringPlane(10, 45);
    const grid = Float64Array.from({ length: 300 }, (_, j) => 125.025 + 0.05 * j);
    const rows = [true, false].map((windowed) => {
      const ctx = shapedPlaneContext(setup, plane, 1, grid, 0.05, { windowed });
      const perp = new Float64Array(grid.length);
      const par = new Float64Array(grid.length);
      shapedPlaneRow(ctx, 8000, perp, par);
      return Array.from(perp, (v, j) => v + par[j]);
    });
    // Measured: identical to 6e-8 (Newton's search restarts from the coarse sweep's v after a gap: the same roots to 1e-13).
    const peak = Math.max(...rows[1]);
    rows[0].forEach((v, j) => expect(Math.abs(v - rows[1][j])).toBeLessThanOrEqual(1e-6 * Math.max(rows[1][j], 1e-3 * peak)));
  }, 600_000);
});
