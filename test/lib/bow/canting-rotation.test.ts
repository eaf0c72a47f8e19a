// The canting mean by rotation over the upright drop's pupil (lib/bow/canting-rotation.ts): its change of variables
// from tilts to (h′, δ), its sphere limit against textbook ray optics and Airy's theory, and a flattened drop against
// brute force.
import { describe, expect, it } from "vitest";
import { tiltDensity, tiltsOf } from "../../../lib/drops/shape/tilt-density.js";
import { cantedAxis } from "../../../lib/rays/bow-geometry.js";
import { rotationCantingRows, rotationCantingRowsAlong, rotationElevationsDeg, rotationPupilStep } from "../../../lib/bow/canting-rotation.js";
import { planeTraceCount } from "../../../lib/rays/plane-sweep.js";
import { spheroidOutline } from "../../../lib/drops/shape/outline.js";
import { equilibriumOutline } from "../../../lib/drops/shape/equilibrium-shape.js";
import { rayOpticsBins } from "../../../lib/bow/ray-bins.js";
import { convolveProfile, sunDiscKernel, SUN_MEAN_ANGULAR_DIAMETER_DEG } from "../../../lib/sun/disc.js";
import { pupilCantingRow } from "../../../bench/canting-pupil.js";
import { rowErrors } from "../../../bench/row-errors.js";
import { dropRow, dropRowContext } from "../../../lib/bow/drop-rows.js";
import { rotationMeanRows, type ShapedRowSpec } from "../../../lib/bow/shaped-rows.js";

const DEG = Math.PI / 180;
const SPAN = { min: 1.3284, max: 1.3479 };

describe("the tilts seen from the sunlight", () => {
  it("(h′, δ) of a tilted axis map back to its tilts (vector algebra: the axis's elevation below −d_in and azimuth about it)", () => {
    const h = 10 * DEG;
    const dIn = [Math.cos(h), 0, -Math.sin(h)];
    const up = [Math.sin(h), 0, Math.cos(h)];
    const side = [0, 1, 0];
    for (const [tx, ty] of [[0, 0], [7.5, 0], [0, 7.5], [-12, 5], [20, -15]]) {
      const a = cantedAxis(tx, ty);
      const elevationDeg = Math.asin(-(a[0] * dIn[0] + a[1] * dIn[1] + a[2] * dIn[2])) / DEG;
      const azimuthDeg = Math.atan2(a[0] * side[0] + a[1] * side[1] + a[2] * side[2], a[0] * up[0] + a[1] * up[1] + a[2] * up[2]) / DEG;
      const [x, y] = tiltsOf(10, elevationDeg, azimuthDeg);
      expect(x).toBeCloseTo(tx, 9);
      expect(y).toBeCloseTo(ty, 9);
    }
  });

  it("carry the Gaussian of tilts' whole mass (midpoint sums over ±5σ, 0.1° apart)", () => {
    for (const [sun, sd] of [[10, 7.5], [30, 4], [2, 2]]) {
      let mass = 0;
      const step = 0.1;
      for (let e = sun - 5 * sd; e <= sun + 5 * sd; e += step) for (let d = -5 * sd; d <= 5 * sd; d += step) mass += tiltDensity(sun, sd, e, d) * step * step;
      expect(mass).toBeCloseTo(1, 3);
    }
  });
});

describe("the canting mean by rotation", () => {
  const disc = sunDiscKernel(SUN_MEAN_ANGULAR_DIAMETER_DEG, 0.1);

  it("of spheres, as ray optics alone, is the sphere's ray optics whatever the tilts: |S1|², |S2|² of orders 0–3 (van de Hulst 1957 §12.2) after the sun's disc", () => {
    // Measured: ⟂ within 0.054 of its peak (0.026 summed; engine 22's uniform pupil step 0.02: 0.055 / 0.031), ∥ within 0.101 of its own peak, 20 times below the ⟂ one
    // near the bow (0.051 summed), sums over the window within 0.7 % and 0.6 %; the worst is at Descartes' angle,
    // where the spread over pupil cells, linear across each, cannot reach the fold's minimum Θ between its corners
    // (a bias of order Θ''·du²; ROTATION_PUPIL_STEP 0.017 at the tilts' mode, growing away from it: rotationPupilStep).
    // Cells near the rim spread linearly move light across the window's edges (JOIN_THETA_DEG): the whole power over
    // 0–180° is kept within 0.2 % (below).
    const thetaDeg = Float64Array.from({ length: 400 }, (_, j) => 110.05 + 0.1 * j);
    const n = 1.3345;
    const x = 1000;
    const [row] = rotationCantingRows({ outline: spheroidOutline(1), sunElevationDeg: 10, cantingSdDeg: 7.5, arcPositionDeg: 45, indexSpan: SPAN, rayOnly: true }, [{ mRe: n, x }], thetaDeg, 0.1);
    const reference = rayOpticsBins(n, [0, 1, 2, 3], thetaDeg, 0.1);
    const perp = rowErrors(convolveProfile(row.perp.map((v) => v / (x * x)), disc), convolveProfile(reference.perpendicular, disc), 20, 380);
    const par = rowErrors(convolveProfile(row.par.map((v) => v / (x * x)), disc), convolveProfile(reference.parallel, disc), 20, 380);
    expect(perp.worst).toBeLessThan(0.07);
    expect(perp.summed).toBeLessThan(0.045);
    expect(par.worst).toBeLessThan(0.2);
    expect(par.summed).toBeLessThan(0.08);
    expect(Math.abs(perp.ratio - 1)).toBeLessThan(0.01);
    expect(Math.abs(par.ratio - 1)).toBeLessThan(0.01);
    // Every scattering angle: the power the rows carry (row × the bins' solid angle) against ray optics'.
    const everyDeg = Float64Array.from({ length: 1780 }, (_, j) => 1.05 + 0.1 * j);
    const [whole] = rotationCantingRows({ outline: spheroidOutline(1), sunElevationDeg: 10, cantingSdDeg: 7.5, arcPositionDeg: 45, indexSpan: SPAN, rayOnly: true }, [{ mRe: n, x }], everyDeg, 0.1);
    const everyRef = rayOpticsBins(n, [0, 1, 2, 3], everyDeg, 0.1);
    const power = (row: Float64Array, scale: number) => row.reduce((sum, v, j) => sum + (v / scale) * Math.sin(everyDeg[j] * DEG), 0);
    expect(Math.abs(power(whole.perp, x * x) / power(everyRef.perpendicular, 1) - 1)).toBeLessThan(0.002);
    expect(Math.abs(power(whole.par, x * x) / power(everyRef.parallel, 1) - 1)).toBeLessThan(0.002);
  }, 120_000);

  it("of spheres, with the bows' wave structure, is Airy's theory of the rainbow (Airy 1838; Wang & van de Hulst 1991) after the sun's disc", () => {
    // Against the sphere's airy engine (lib/bow/airy-bins.ts), 1 mm drops at 550 nm, on a pupil grid fine enough that
    // the rotation's own fold bias (of order Θ''·du², largest at the secondary's fold near the rim) is small (0.01 at
    // every elevation: with the service's growth away from the tilts' mode, 0.023 / 0.081 and rays 0.095 / 0.279): measured
    // worst 0.017 / 0.058 of each bow's own peak (primary / secondary), where ray optics alone gives 0.099 / 0.299.
    const step = 0.05;
    const count = 700;
    const thetaDeg = Float64Array.from({ length: count }, (_, j) => 118 + step * (j + 0.5));
    const sun = sunDiscKernel(SUN_MEAN_ANGULAR_DIAMETER_DEG, step);
    const n = 1.3345;
    const radiusUm = 1000;
    const x = (2 * Math.PI * radiusUm) / 0.55;
    const perp = new Float64Array(count);
    const par = new Float64Array(count);
    dropRow(dropRowContext({ wavelengthNm: 550, mRe: n, mIm: 0, nAir: 1 }, thetaDeg, step, new Set(["airy"])), "airy", radiusUm, perp, par);
    const reference = convolveProfile(perp.map((v, j) => v + par[j]), sun);
    const bin = (deg: number) => Math.round((deg - 118) / step);
    const figures = (rayOnly: boolean) => {
      const setup = { outline: spheroidOutline(1), sunElevationDeg: 10, cantingSdDeg: 7.5, arcPositionDeg: 45, indexSpan: SPAN, rayOnly, grid: { pupilStep: 0.01, elevationsPerSd: 1, growthCap: 1 } };
      const [row] = rotationCantingRows(setup, [{ mRe: n, x }], thetaDeg, step);
      const total = convolveProfile(row.perp.map((v, j) => v + row.par[j]), sun);
      return { primary: rowErrors(total, reference, bin(134), bin(145)), secondary: rowErrors(total, reference, bin(124), bin(131)) };
    };
    const waves = figures(false);
    expect(waves.primary.worst).toBeLessThan(0.03);
    expect(waves.secondary.worst).toBeLessThan(0.09);
    const rays = figures(true);
    expect(rays.primary.worst).toBeGreaterThan(0.06);
    expect(rays.secondary.worst).toBeGreaterThan(0.2);
  }, 120_000);

  it("of 2 mm equilibrium drops at the top of the bow meets brute force over the pupil, which no grid of this engine enters", () => {
    // Ray optics alone on both sides. Brute force: every ray of a square grid over the upright drop's pupil binned as a point, each weighed by the
    // tilts' density at the arc position it leaves at (bench/canting-pupil.ts), on a grid of its own (pupil step
    // 0.008, elevations 1° apart). Measured: worst 0.044 of the peak, 0.014 summed, sums within 3e-3
    // (engine 22's uniform pupil step 0.02: 0.047 / 0.016, within 1e-3; against the finer reference of BENCHMARKS.md
    // canting-splat, pupil step 0.005: 0.062 / 0.017, engine 22 0.074 / 0.017); the banded canting rule, which served
    // these drops before, gave 0.596 / 0.251 there.
    const step = 0.05;
    const thetaDeg = Float64Array.from({ length: 700 }, (_, j) => 118.025 + step * j);
    const x = (2 * Math.PI * 2000) / 0.55;
    const outline = equilibriumOutline(2000);
    const sun = sunDiscKernel(SUN_MEAN_ANGULAR_DIAMETER_DEG, step);
    const [row] = rotationCantingRows({ outline, sunElevationDeg: 10, cantingSdDeg: 7.5, arcPositionDeg: 0, indexSpan: SPAN, rayOnly: true }, [{ mRe: 1.3345, x }], thetaDeg, step);
    const brute = pupilCantingRow(outline, 1.3345, 10, 0, 7.5, thetaDeg[0] - step / 2, step, thetaDeg.length, { du: 0.008, elevationStepDeg: 1, spanSd: 3.5 });
    const figures = rowErrors(
      convolveProfile(row.perp.map((v, j) => v + row.par[j]), sun),
      convolveProfile(brute.map((v) => v * x * x), sun),
      80,
      640,
    );
    expect(figures.worst).toBeLessThan(0.08);
    expect(figures.summed).toBeLessThan(0.03);
    expect(Math.abs(figures.ratio - 1)).toBeLessThan(0.01);
  }, 300_000);

  it("traces the elevations away from the tilts' mode on pupils coarser by e^{z²/8}, at most twice the mode's step", () => {
    // rotationPupilStep: du ∝ w^(−1/4) for the Gaussian weight w ∝ e^{−z²/2} of each elevation (derived in
    // canting-rotation.ts). The rays a pass traces follow the pupil's area over du² at each elevation: counted against
    // the same pass with one step everywhere (growthCap 1), the ratio is the mean of (du/du_z)² over the elevations.
    expect(rotationPupilStep(0.02, 0)).toBe(0.02);
    expect(rotationPupilStep(0.02, -2)).toBeCloseTo(0.02 * Math.exp(0.5), 12);
    expect(rotationPupilStep(0.02, 3)).toBe(0.04);
    const thetaDeg = Float64Array.from({ length: 200 }, (_, j) => 120.05 + 0.1 * j);
    const traces = (growthCap?: number) => {
      const before = planeTraceCount.traces;
      const grid = { pupilStep: 0.03, elevationsPerSd: 2, ...(growthCap === undefined ? {} : { growthCap }) };
      rotationCantingRows({ outline: equilibriumOutline(1500), sunElevationDeg: 10, cantingSdDeg: 7.5, arcPositionDeg: 45, indexSpan: SPAN, rayOnly: true, grid }, [{ mRe: 1.3345, x: 1.7e4 }], thetaDeg, 0.1);
      return planeTraceCount.traces - before;
    };
    const expected = rotationElevationsDeg(7.5, undefined, 2).reduce((sum, { offsetDeg }) => sum + (0.03 / rotationPupilStep(0.03, offsetDeg / 7.5)) ** 2, 0) / rotationElevationsDeg(7.5, undefined, 2).length;
    const ratio = traces() / traces(1);
    expect(expected).toBeLessThan(0.65);
    expect(Math.abs(ratio / expected - 1)).toBeLessThan(0.1);
  }, 120_000);

  it("traces at one index only the rays that give the place asked for no light, and loses nothing by it", () => {
    // Against the same pass with places all round the bow asked for, where every exit α is live and every ray is traced
    // at every index: the place's rows within 1e-3 of their peak (the tilts' density is cut at e⁻⁸ of its peak, a
    // Gaussian's 4σ, which leaves out 6e-5 of its mass; the margins of the test at the first index are measured in
    // canting-rotation.ts). A coarse grid, to keep the test short.
    const step = 0.1;
    const thetaDeg = Float64Array.from({ length: 400 }, (_, j) => 115.05 + step * j);
    const drops = [{ mRe: 1.3311, x: 2.4e4 }, { mRe: 1.3421, x: 2.2e4 }];
    const ring = Array.from({ length: 12 }, (_, k) => -180 + 30 * k);
    for (const [radiusUm, sun, arc] of [[2500, 10, 90], [1800, 35, 0]]) {
      const setup = { outline: equilibriumOutline(radiusUm), sunElevationDeg: sun, cantingSdDeg: 7.5, arcPositionDeg: arc, indexSpan: SPAN, grid: { pupilStep: 0.05, elevationsPerSd: 2 } };
      const alone = rotationCantingRows(setup, drops, thetaDeg, step);
      const everyRay = rotationCantingRowsAlong(setup, [arc, ...ring], drops, thetaDeg, step)[0];
      alone.forEach((row, d) => {
        for (const pol of ["perp", "par"] as const) {
          const peak = Math.max(...everyRay[d][pol]);
          expect(peak).toBeGreaterThan(0);
          for (let j = 0; j < thetaDeg.length; j++) expect(Math.abs(row[pol][j] - everyRay[d][pol][j])).toBeLessThan(1e-3 * peak);
        }
      });
    }
  }, 120_000);

  it("spreads the bows of a kernel row by Airy kernels unless its spec asks for ray optics alone (method \"geometric\")", () => {
    // The spec's rayOnly reaches the rotation: its slices add up to the rays-only or the spread rows of the whole pass.
    const step = 0.1;
    const thetaDeg = Float64Array.from({ length: 300 }, (_, j) => 120.05 + step * j);
    const drops = [{ radiusUm: 1800, mRe: 1.3345, x: 2.06e4 }];
    const grid = { pupilStep: 0.06, elevationsPerSd: 2 };
    const spec: ShapedRowSpec = { kind: "equilibrium", cantingSdDeg: 7.5, sunElevationDeg: 10, arcPositionDeg: 45, rayOnly: true, cantingRotation: true, rotationGrid: grid, indexSpan: SPAN };
    const summed = (rayOnly: boolean) => {
      const { pieces } = rotationMeanRows({ ...spec, rayOnly }, drops, thetaDeg, step);
      return pieces[0].reduce((sum, piece) => sum.map((v, j) => v + piece.perp[j] + piece.par[j]), new Float64Array(thetaDeg.length));
    };
    const direct = (rayOnly: boolean) => {
      const [row] = rotationCantingRows({ outline: equilibriumOutline(1800), sunElevationDeg: 10, cantingSdDeg: 7.5, arcPositionDeg: 45, indexSpan: SPAN, rayOnly, grid }, drops, thetaDeg, step);
      return row.perp.map((v, j) => v + row.par[j]);
    };
    for (const rayOnly of [true, false]) {
      const a = summed(rayOnly);
      const b = direct(rayOnly);
      const peak = Math.max(...b);
      for (let j = 0; j < thetaDeg.length; j++) expect(Math.abs(a[j] - b[j])).toBeLessThan(1e-9 * peak);
    }
    // And the two differ: the spread moves light near the folds.
    const rays = summed(true);
    const waves = summed(false);
    expect(Math.max(...rays.map((v, j) => Math.abs(v - waves[j])))).toBeGreaterThan(1e-3 * Math.max(...rays));
  }, 60_000);
});
