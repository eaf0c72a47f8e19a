import { describe, expect, it } from "vitest";
import { INDEX_NODES, SHAPED_ORDER_GROUPS, SHAPE_NODES_MAX_RADIUS_UM, shapedDropRow, shapedNodeRows, shapedRows, tracedShapeCount, type ShapedRowSpec } from "../../../lib/bow/shaped-rows.js";
import { shapedPlaneContext, shapedPlaneRow } from "../../../lib/bow/shaped-plane-rows.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { bowScatteringPlane, cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { shapeNodeWeights } from "../../../lib/drops/shape/shape-nodes.js";
import { WATER_INDEX_RANGE } from "../../../lib/water/index-range.js";

const thetaDeg = Float64Array.from({ length: 60 }, (_, j) => 136.05 + 0.1 * j);
const N_WATER = 1.3337;

function row(spec: ShapedRowSpec, x: number, radiusUm: number, mRe = N_WATER): number[] {
  const perp = new Float64Array(thetaDeg.length);
  const par = new Float64Array(thetaDeg.length);
  shapedDropRow(spec, mRe, x, radiusUm, thetaDeg, 0.1, perp, par);
  return Array.from(perp, (v, j) => v + par[j]);
}

function sum(r: { perp: Float64Array; par: Float64Array }): number[] {
  return Array.from(r.perp, (v, j) => v + r.par[j]);
}

/**
 * Worst |a − b| over b's peak after both are averaged over 5 bins of 0.1° (a stand-in for the sun's disc of 0.53°, which
 * the service folds every profile with): the scale at which a row's errors reach a colour.
 */
function sunDiscMiss(a: readonly number[], b: readonly number[]): number {
  const smooth = (v: readonly number[]) => v.map((_, j) => {
    const part = v.slice(Math.max(0, j - 2), j + 3);
    return part.reduce((s, w) => s + w, 0) / part.length;
  });
  const as = smooth(a);
  const bs = smooth(b);
  const peak = Math.max(...bs);
  return Math.max(...as.map((v, j) => Math.abs(v - bs[j]))) / peak;
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

describe("a row is computed order group by order group", () => {
  it("the groups' shares, added, equal one context of every order (1e-12 of the peak), and each group alone is its share bit for bit", () => {
    // One canted node in a plane it leaves (arc 45°), traced at the drop's own index: the groups' shares against the
    // rows of one context holding orders 0–3 together (shapedPlaneContext's defaults), the way rows were made before.
    const spec: ShapedRowSpec = { kind: "spheroid", axisRatio: 0.9, cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 45, rayOnly: false, traceEveryIndex: true };
    const drop = { radiusUm: 700, mRe: N_WATER, x: 7000 };
    const { rows, planes } = shapedNodeRows(spec, [drop], thetaDeg, 0.1);
    expect(rows[0].length).toBe(SHAPED_ORDER_GROUPS.length);
    // A plane counts once, with its first group, whatever groups it is computed in.
    expect(planes).toEqual({ traced: 1, interpolated: 0 });
    const ctx = shapedPlaneContext({ outline: spheroidOutline(0.9), axis: cantedAxis(0, 0), n: N_WATER }, bowScatteringPlane(10, 45), 1, thetaDeg, 0.1);
    const perp = new Float64Array(thetaDeg.length);
    const par = new Float64Array(thetaDeg.length);
    shapedPlaneRow(ctx, drop.x, perp, par);
    const peak = Math.max(...perp, ...par);
    // Addition of the same terms in another order: rounding, ~1e-16 of each term.
    thetaDeg.forEach((_, j) => {
      expect(Math.abs(rows[0].reduce((s, g) => s + g.perp[j], 0) - perp[j])).toBeLessThanOrEqual(1e-12 * peak);
      expect(Math.abs(rows[0].reduce((s, g) => s + g.par[j], 0) - par[j])).toBeLessThanOrEqual(1e-12 * peak);
    });
    // Each group carries light (the reflection everywhere, the bows near their angles), and alone gives its share.
    SHAPED_ORDER_GROUPS.forEach((_, g) => {
      const alone = shapedNodeRows({ ...spec, orderGroup: g }, [drop], thetaDeg, 0.1);
      expect(alone.rows[0].length).toBe(1);
      expect(Array.from(alone.rows[0][0].perp)).toEqual(Array.from(rows[0][g].perp));
      expect(Array.from(alone.rows[0][0].par)).toEqual(Array.from(rows[0][g].par));
      expect(alone.planes).toEqual(g === 0 ? planes : { traced: 0, interpolated: 0 });
      expect(Math.max(...rows[0][g].perp)).toBeGreaterThan(0);
    });
    expect(() => shapedNodeRows({ ...spec, orderGroup: SHAPED_ORDER_GROUPS.length }, [drop], thetaDeg, 0.1)).toThrow(RangeError);
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

describe("every wavelength's plane is interpolated from planes traced at fixed refractive indices", () => {
  it("rows of 1 mm equilibrium drops at 11 wavelengths (sweeps interpolated from tracedIndices) equal direct tracing within 1e-6 of the peak", () => {
    // Water's index over 400–700 nm (Daimon & Masumura 2007 at 20 °C rounded, from memory): n falls from 1.3395 to
    // 1.3312; the interpolation is across n, so any smooth run of indices serves.
    const indices = Array.from({ length: 11 }, (_, l) => 1.3395 - (0.0083 * l) / 10);
    const spec: ShapedRowSpec = { kind: "equilibrium", cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 45, rayOnly: false, indexBlend: "sweeps" };
    const drops = indices.map((mRe, l) => ({ radiusUm: 1000, mRe, x: (2 * Math.PI * 1000) / (0.4 + 0.03 * l) }));
    const together = shapedRows(spec, drops, thetaDeg, 0.1);
    let worst = 0;
    drops.forEach((drop, l) => {
      const direct = row({ ...spec, traceEveryIndex: true }, drop.x, drop.radiusUm, drop.mRe);
      const mine = Array.from(together[l].perp, (v, j) => v + together[l].par[j]);
      const peak = Math.max(...direct);
      mine.forEach((v, j) => (worst = Math.max(worst, Math.abs(v - direct[j]) / peak)));
    });
    // Measured: 6e-13 of the peak (7 Chebyshev nodes over Δn = 0.038: Lagrange's error ~ (Δn/2)⁷·f⁽⁷⁾/(2⁶·7!), and
    // the samples it does not trust are traced at n). Bound: 1e-6, far below the sphere limit's 1e-3.
    expect(worst).toBeLessThanOrEqual(1e-6);
  }, 600_000);

  it("rows at the top of the bow, blended across n with their bows aligned, follow direct tracing (1e-2 of the peak after 0.5°)", () => {
    // 1 mm equilibrium drops, no canting, top of the bow: the primary's and secondary's folds lie in the grid and move
    // ~2° over water's span. Indices at 20, 55 and 90 % of the span tracedIndices covers (WATER_INDEX_RANGE).
    const spec: ShapedRowSpec = { kind: "equilibrium", cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 0, rayOnly: false };
    const grid = Float64Array.from({ length: 200 }, (_, j) => 125.05 + 0.1 * j);
    const span = WATER_INDEX_RANGE;
    const drops = [0.2, 0.55, 0.9].map((t, l) => ({ radiusUm: 1000, mRe: span.min + t * (span.max - span.min), x: (2 * Math.PI * 1000) / (0.45 + 0.1 * l) }));
    const { rows, planes } = shapedNodeRows(spec, drops, grid, 0.1);
    expect(planes).toEqual({ traced: INDEX_NODES, interpolated: drops.length });
    const direct = shapedRows({ ...spec, traceEveryIndex: true }, drops, grid, 0.1);
    // Measured: 1.0e-3, 1.1e-3, 1.6e-3 (the bows shifted exactly, their widths blended across n); bound 1e-2 (6× the measured;
    // bin means shifted by linear interpolation instead missed by 1.6e-2).
    drops.forEach((_, d) => expect(sunDiscMiss(rows[d].reduce((a, share) => a.map((v, j) => v + share.perp[j] + share.par[j]), new Array<number>(grid.length).fill(0)), sum(direct[d]))).toBeLessThanOrEqual(1e-2));
  }, 600_000);

  it("a group whose rows one shift does not follow is traced at the drop's own index instead: 2.5 mm drops at the top", () => {
    // The secondary's window holds a second caustic 3,000 times the reflection, moving with n on its own: the leave-one-out
    // row check sends that group to tracing at each drop's index, which is what the direct reference does.
    const spec: ShapedRowSpec = { kind: "equilibrium", cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 0, rayOnly: false, orderGroup: 2 };
    const grid = Float64Array.from({ length: 200 }, (_, j) => 125.05 + 0.1 * j);
    const drop = { radiusUm: 2500, mRe: N_WATER, x: 12000 };
    const aligned = shapedRows(spec, [drop], grid, 0.1)[0];
    const direct = shapedRows({ ...spec, traceEveryIndex: true }, [drop], grid, 0.1)[0];
    // The same planes, their bins laid on a padded grid: rounding only (measured 2.2e-13 of the peak; bound 1e-9).
    const peak = Math.max(...sum(direct));
    sum(aligned).forEach((v, j) => expect(Math.abs(v - sum(direct)[j])).toBeLessThanOrEqual(1e-9 * peak));
  }, 600_000);

  it("a drop's row does not depend on the other wavelengths computed with it: bit for bit", () => {
    const spec: ShapedRowSpec = { kind: "equilibrium", cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 45, rayOnly: false };
    const drop = { radiusUm: 800, mRe: 1.3361, x: 9000 };
    const alone = shapedRows(spec, [drop], thetaDeg, 0.1)[0];
    // With other indices before it: more than INDEX_NODES over a wide spread (the old nodes spanned a task's own
    // indices, so these moved them), and one close by.
    for (const others of [[1.344, 1.342, 1.34, 1.338, 1.331, 1.329, 1.327, 1.325], [1.3365]]) {
      const mixed = shapedRows(spec, [...others.map((mRe) => ({ ...drop, mRe })), drop], thetaDeg, 0.1)[others.length];
      expect(Array.from(mixed.perp)).toEqual(Array.from(alone.perp));
      expect(Array.from(mixed.par)).toEqual(Array.from(alone.par));
    }
  }, 600_000);
});

describe("equilibrium drops blended from shape nodes share the nodes' traced planes", () => {
  const spec: ShapedRowSpec = { kind: "equilibrium", deformationStep: 0.005, cantingSdDeg: 0, sunElevationDeg: 10, arcPositionDeg: 0, rayOnly: false };

  it("drops computed together equal each alone, bit for bit (also one above SHAPE_NODES_MAX_RADIUS_UM, its own shape)", () => {
    const radii = [970, 1000, 1300];
    const together = shapedRows(spec, radii.map((radiusUm) => ({ radiusUm, mRe: N_WATER, x: 12000 })), thetaDeg, 0.1);
    radii.forEach((radiusUm, k) => expect(Array.from(together[k].perp, (v, j) => v + together[k].par[j])).toEqual(row(spec, 12000, radiusUm)));
  }, 600_000);

  it("a drop's row, blended from the nodes' rows with their bows aligned, follows its own shape's (1e-2 of the peak after 0.5°); unaligned it does not", () => {
    const grid = Float64Array.from({ length: 200 }, (_, j) => 125.05 + 0.1 * j);
    const nodes = shapeNodeWeights(1000, 0.005);
    expect(nodes).toHaveLength(2);
    const direct = (radiusUm: number) => sum(shapedRows({ ...spec, deformationStep: 0, traceEveryIndex: true }, [{ radiusUm, mRe: N_WATER, x: 12000 }], grid, 0.1)[0]);
    const own = direct(1000);
    const mine = sum(shapedRows(spec, [{ radiusUm: 1000, mRe: N_WATER, x: 12000 }], grid, 0.1)[0]);
    const plain = nodes.map((n) => direct(n.radiusUm).map((v) => n.weight * v)).reduce((a, b) => a.map((v, j) => v + b[j]));
    // Measured: 2.6e-3 aligned, 0.108 with the nodes' rows blended as they are (their tops of the bow sit 0.4° apart,
    // about 1° per 0.01 of flattening); bound 1e-2.
    expect(sunDiscMiss(mine, own)).toBeLessThanOrEqual(1e-2);
    expect(sunDiscMiss(plain, own)).toBeGreaterThan(5e-2);
  }, 600_000);

  it("drops above SHAPE_NODES_MAX_RADIUS_UM keep their own shape: the same row as without nodes, bit for bit", () => {
    const above = SHAPE_NODES_MAX_RADIUS_UM * 1.3;
    expect(row(spec, 15000, above)).toEqual(row({ ...spec, deformationStep: undefined }, 15000, above));
    // Below it the row is blended from two nodes, not its own shape's.
    expect(row(spec, 12000, 1000)).not.toEqual(row({ ...spec, deformationStep: undefined }, 12000, 1000));
  }, 600_000);

  it("a shower's flattened radii are traced with fewer shapes: the nodes below SHAPE_NODES_MAX_RADIUS_UM, each radius above it", () => {
    const radii = Array.from({ length: 40 }, (_, k) => 150 * Math.pow(20, k / 39));
    const above = radii.filter((r) => r > SHAPE_NODES_MAX_RADIUS_UM).length;
    const shared = tracedShapeCount(spec, radii);
    const nodesBelow = new Set(radii.filter((r) => r <= SHAPE_NODES_MAX_RADIUS_UM).flatMap((r) => shapeNodeWeights(r, 0.005).map((n) => n.radiusUm))).size;
    expect(shared).toBe(nodesBelow + above);
    expect(shared).toBeLessThan(radii.length);
    expect(tracedShapeCount({ ...spec, deformationStep: undefined }, radii)).toBe(radii.length);
  });
});
