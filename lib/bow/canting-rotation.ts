// The canting mean of a flattened drop's rows by rotation over the upright drop's pupil, with no rule of tilt nodes.
// A drop whose axis has elevation h′ below the sunlight and azimuth δ about it sends into the plane at arc position A
// what the upright drop, with the sun at h′, sends to A − δ (lib/drops/shape/tilt-density.ts). So the mean over the
// tilts is ∫∫ p(h′, δ)·I(Θ, A − δ; h′) dh′ dδ: for each h′ on a grid, every ray of a square grid over the upright
// drop's pupil is traced once and its power, weighed by p(h′, A − α) at the arc position α where it leaves, spread
// over Θ with the pupil cells it is a corner of, each cell as two triangles whose rays' angles vary linearly across them
// (lib/bow/triangle-bins.ts; van de Hulst 1957 §12.22: the power of a bundle of rays is kept along it). Ray optics, orders
// 0–3, with the bows' wave structure restored: the light of the primary's and the secondary's orders is spread over Θ by
// their folds' Airy kernels (lib/bow/airy-spread.ts), each fold's width from the upright drop's own scattering plane at
// the place (Airy-type theory per plane), which commute with the mean over tilts. Seen through the sun's disc that
// moves canted (7.5°) equilibrium drops' rows by 0.004–0.017 of their peak (1.5–2.5 mm, top, side and arc 45°; issue
// 13's notes), a sphere's by 0.06–0.35 of its bows' peaks. Rows at each wavelength come from rays traced at
// a few refractive indices: each ray's Θ, α and powers are smooth in n (Snell's law at each face), so they are
// interpolated ray by ray (Lagrange's form, Press et al. 2007 Eq. 3.2.1). Only the half of the pupil on one side of
// the drop's mirror plane through the sunlight is traced, each ray standing for its mirror image too, and a ray whose
// exits at the first index give the places asked for no light is not traced at the others.

import type { DropOutline } from "../drops/shape/outline.js";
import { tiltDensity } from "../drops/shape/tilt-density.js";
import { bowScatteringPlane } from "../rays/bow-geometry.js";
import { AT, ORDER_STRIDE } from "../rays/shape-tracer.js";
import { chebyshevNodes, lagrangeWeights } from "../rays/sweep-interpolation.js";
import { shapedPlaneTracer } from "./shaped-plane-rows.js";
import { depositOverInterval } from "./ray-bins.js";
import { depositOverTriangle } from "./triangle-bins.js";
import type { PlaneTracer } from "../rays/plane-sweep.js";
import { airySpreadKernel, airySpreadKernelShape, foldWidth, kernelReach, sphereFoldKappa, spreadWithAiry, type AirySpreadKernel, type FoldKappa } from "./airy-spread.js";
import { planeFoldKappas } from "./plane-fold-width.js";

const DEG = Math.PI / 180;
/** Orders traced: reflection, transmission, the primary's and the secondary's. */
const ORDERS = 4;
/** The exit fields a trace keeps per order (real and imaginary parts for each incident polarisation: shape-tracer.ts AT). */
const EXIT_FIELDS = [AT.e1Re, AT.e1Im, AT.e2Re, AT.e2Im] as const;
/** The orders whose folds make the bows (the primary's, the secondary's): their light is spread by Airy kernels. */
const BOW_ORDERS = [2, 3] as const;
/** Light collected apart: orders 0 and 1 together, then each bow order. */
const CLASSES = [0, 1, 2] as const;
const orderClass = (p: number): number => (p < 2 ? 0 : p - 1);

/**
 * The folds of the upright drop's plane at each place, by the outline's radii at the poles, the equator and between
 * (its fingerprint: the slices of one task, traced as parts on the threads, each build their own outline object).
 */
const planeFolds = new Map<string, (FoldKappa | null)[]>();
const PLANE_FOLDS_MEMO_SIZE = 1024;
/** Kernels by width and lit side: the slices, places and tasks of a thread meet the same ones again. */
const kernelMemo = new Map<string, AirySpreadKernel>();
const KERNEL_MEMO_SIZE = 4096;
/**
 * A plane's κ is taken no lower than this share of the sphere's (its fold at most twice as wide), which bounds the
 * kernels' reach: measured 0.66–2.5 on equilibrium drops of 1.5–2.5 mm (lib/bow/plane-fold-width.ts).
 */
const MIN_KAPPA_SHARE = 0.5;

/** Bins the widest kernel a drop's fold of order p may take reaches (κ at MIN_KAPPA_SHARE of the sphere's). */
function widestReach(drop: RotationDrop, p: number, stepDeg: number): number {
  const sphere = sphereFoldKappa(drop.mRe, p - 1);
  return kernelReach(airySpreadKernelShape(foldWidth(MIN_KAPPA_SHARE * sphere.kappa, drop.x, sphere.litSide).sigmaDeg / stepDeg));
}

/**
 * Each drop's Airy kernels for its primary's and secondary's folds at the place arcDeg, on bins stepDeg wide: κ from
 * the upright drop's own plane there under the sun (the tilts' mode; lib/bow/plane-fold-width.ts) at the middle of
 * the index span, carried to each drop's index as the sphere's κ changes with it (1.5 % over the span of water), or
 * the sphere's own where that plane has no such fold.
 */
function foldKernels(setup: RotationSetup, arcDeg: number, drops: readonly RotationDrop[], stepDeg: number): AirySpreadKernel[][] {
  const nMid = 0.5 * (setup.indexSpan.min + setup.indexSpan.max);
  const { outline } = setup;
  const key = `${[1, 0.5, 0, -0.5, -1].map((mu) => outline.radius(mu)).join(",")}:${setup.sunElevationDeg}:${arcDeg}:${nMid}`;
  let folds = planeFolds.get(key);
  if (!folds) {
    if (planeFolds.size >= PLANE_FOLDS_MEMO_SIZE) planeFolds.clear();
    planeFolds.set(key, (folds = planeFoldKappas(outline, setup.sunElevationDeg, arcDeg, nMid)));
  }
  // Each plane's κ as a share of the sphere's at the same index, taken to each drop's index.
  const shares = BOW_ORDERS.map((p, b) => (folds![b] ? Math.max(MIN_KAPPA_SHARE, folds![b]!.kappa / sphereFoldKappa(nMid, p - 1).kappa) : 1));
  return drops.map((drop) =>
    BOW_ORDERS.map((p, b) => {
      const sphere = sphereFoldKappa(drop.mRe, p - 1);
      const plane = folds![b];
      const kappa = shares[b] * sphere.kappa;
      const { sigmaDeg, litSide } = foldWidth(kappa, drop.x, plane?.litSide ?? sphere.litSide);
      const memoKey = `${(sigmaDeg / stepDeg).toPrecision(6)}:${litSide}`;
      let kernel = kernelMemo.get(memoKey);
      if (!kernel) {
        if (kernelMemo.size >= KERNEL_MEMO_SIZE) kernelMemo.clear();
        kernelMemo.set(memoKey, (kernel = airySpreadKernel(sigmaDeg / stepDeg, litSide)));
      }
      return kernel;
    }),
  );
}

/**
 * The grid of the mean. Before engine 23 one pupil step for every elevation; measured at 550 nm against brute force over
 * the pupil (pupil step 0.005, elevations 0.5° apart, point bins: bench/canting-pupil.ts) after the sun's disc, worst
 * share of the peak / summed (BENCHMARKS.md canting-splat, 1–2.5 mm drops at the top, side and between, 2026-12-05 02:54
 * UTC): pupil step 0.02 gave 0.019–0.087 / 0.011–0.049 at 1.6–2.2 s of CPU at one wavelength; 0.014 gave 0.023–0.116 /
 * 0.010–0.040 at twice the rays, 0.01 0.027–0.102 / 0.009–0.041 at four times: no better, the brute force itself being
 * good to about 0.05. Elevations σ/7.5 apart (1° at σ 7.5°) over ±3.5σ, which leaves out 5e-4 of the tilts' mass: σ/3.75
 * apart left up to 0.205 / 0.057 at the top. Since engine 23 the step is ROTATION_PUPIL_STEP at the tilts' mode and grows
 * away from it (rotationPupilStep).
 */
export const ROTATION_PUPIL_STEP = 0.017;
export const ROTATION_ELEVATIONS_PER_SD = 7.5;
export const ROTATION_SPAN_SD = 3.5;
/**
 * Refractive indices each ray is traced at: Chebyshev nodes over the water's span. Measured on 1,600 random rays of a
 * 2 mm drop (sun 10°, n 1.3284–1.3479, orders 0–3): Θ interpolated from 5 nodes within 0.009° of the ray traced at
 * its own index, from 4 within 0.05° (one ray of the primary's order near the rim; the rest far closer), from 3 within
 * 0.6°; the rows at 550 nm from 4 nodes and from 5 differ from brute force alike (within 0.002 of the peak).
 */
export const ROTATION_INDEX_NODES = 4;
/**
 * Drops canted less than this keep the canting rules (lib/bow/plane-canting-nodes.ts). Measured at 550 nm against brute
 * force over the pupil as for ROTATION_PUPIL_STEP, before the grids' turns and shifts: canting σ 4°, 2 mm drops, worst
 * of the peak / summed 0.065 / 0.022 at the side and 0.016 / 0.005 at the top (the rules 0.735 / 0.435 and 0.385 /
 * 0.190); σ 2°, at the side, 2 mm 0.195 / 0.043 (rules 1.928 / 0.307), 1.5 mm 0.150 / 0.079 (rules 0.145 / 0.058).
 * Narrower spreads leave fewer rays at each place on the bow (the tilt density's width in α is about σ).
 */
export const ROTATION_MIN_CANTING_SD_DEG = 2;
/**
 * How far the pupil step may grow at elevations away from the tilts' mode (rotationPupilStep): twice ROTATION_PUPIL_STEP.
 * At one wavelength against brute force (as above, pupil step 0.02 at the mode; issue 13's notes) caps of 2 and 3 gave
 * the same errors within the grids' own scatter, 3 saving 4–10 % more CPU; the smaller cap keeps fewer rim cells past
 * JOIN_THETA_DEG, where they are left as points.
 */
export const ROTATION_STEP_GROWTH_CAP = 2;

/**
 * The pupil step at an elevation z·σ from the tilts' mode: du·min(cap, e^{z²/8}). Each elevation's rays enter the mean
 * weighed by the tilts' Gaussian mass there, w ∝ e^{−z²/2}; a grid's error at one elevation grows as du² (the cells' fold
 * bias, of order Θ''·du²) and its rays as 1/du², so the fewest rays for a given Σ w·du² take du ∝ w^{−1/4} = e^{z²/8}
 * (a Lagrange multiplier; derived here). Measured on Marshall–Palmer 25 mm/h
 * with equilibrium shapes (canting 7.5°, 380–780 nm every 20 nm, ψ 30–60°; issue 13's notes, 2026-12-05): with
 * ROTATION_PUPIL_STEP 0.017 growing to 0.034 against the uniform 0.02 of engine 22, the whole cold profile 0.82× (sun
 * 10°, top of the bow) and 0.80× (sun 30°, side) of the time, two draws of the grids' turns ΔE2000 0.138 / 0.235 apart
 * at worst (uniform 0.02: 0.291 / 0.311), and a finer reference (uniform 0.014, σ/15) 0.157–0.170 / 0.415–0.441 away
 * (uniform 0.02: 0.181–0.278 / 0.443–0.565).
 */
export function rotationPupilStep(du: number, zSd: number, cap = ROTATION_STEP_GROWTH_CAP): number {
  return du * Math.min(cap, Math.max(1, Math.exp((zSd * zSd) / 8)));
}

/** The elevations are computed in this many slices (parts of a kernel task on the pool's threads). */
export const ROTATION_SLICES = 4;
/** The golden angle 180°(3 − √5) and the R2 sequence's steps 1/g, 1/g² (g the plastic number, the real root of g³ = g + 1): low-discrepancy turns and shifts (common practice). */
const GOLDEN_ANGLE_DEG = 180 * (3 - Math.sqrt(5));
const R2_STEPS = [0.7548776662466927, 0.5698402909980532] as const;
/** Draws of the grids' turns (RotationSetup.grid.draw) start this far apart in the sequences: past any elevation's place. */
const DRAW_STRIDE = 1000;
/** Step of the table of the tilt density over azimuth, degrees (linear interpolation between). */
const AZIMUTH_STEP_DEG = 0.05;
/**
 * A pupil cell whose corners leave further apart than this in Θ (degrees) is not spread as triangles: each corner's share
 * stays at its own angle. The rays of one order leave a convex drop at angles continuous over the pupil but near its
 * rim, where Θ turns as the square root of the distance to it: at pupil step 0.02 the primary's cells there span up to
 * about 15° (2 mm drops, sun 30°). Measured (issue 13's notes; two draws of the grids' turns, 550 nm, after the sun's
 * disc, rms of their difference over ψ 30–58° as a share of the peak, 2 mm drops at arc 90° under a sun at 30°): 0.05
 * with segments along u joined within 3°, 0.027 with triangles within 3°, 0.015 within 12° or 20°. Within 20° the
 * linear spread of rim cells moved 5 % of a sphere's ⟂ light over Θ 150–180° (its power over 0–180° is kept within
 * 0.1 %); within 12°, 2 %.
 */
const JOIN_THETA_DEG = 12;
/**
 * Rays whose every order leaves where no tilt sends light to the places asked for are traced at one index only. A place
 * on the bow takes light from exits at α only where the tilt density p(h′, A − α) is above this share of its peak over
 * azimuth at that elevation: e⁻⁸, a Gaussian's value at 4σ (what is left out beyond it is 6e-5 of a Gaussian's mass).
 */
const LIVE_DENSITY_SHARE = Math.exp(-8);
/**
 * How far the other index nodes' exits may lie from the first node's, for the test above, in degrees on the sky: an
 * exit at ψ = 180° − Θ from the antisolar point that moves by this much moves in α by up to this / sin ψ. Measured on
 * 20,000 random rays of 1.04, 2 and 3.3 mm drops at sun elevations −17° to 55° (orders 0–3, n 1.3284–1.3479; issue
 * 13's notes): most exits move by under 10° (in Θ, and in α times sin ψ); the few that move more lie by the rim, where
 * an order leaves at one index and not at another (those are traced at every index).
 */
const LIVE_MARGIN_DEG = 15;
/** Exits this close to the antisolar point (ψ, degrees) are live at every α. */
const LIVE_NEAR_ANTISOLAR_DEG = 3;

export interface RotationDrop {
  mRe: number;
  x: number;
}

export interface RotationSetup {
  outline: DropOutline;
  sunElevationDeg: number;
  cantingSdDeg: number;
  arcPositionDeg: number;
  /** The span of the drops' real index the traced indices cover. */
  indexSpan: { min: number; max: number };
  /**
   * True: ray optics alone (method "geometric", and the checks against brute force over the pupil); else the primary's
   * and the secondary's rows are spread by their folds' Airy kernels (lib/bow/airy-spread.ts).
   */
  rayOnly?: boolean;
  /**
   * Benchmarks only: another pupil step and density of elevations than ROTATION_PUPIL_STEP and ROTATION_ELEVATIONS_PER_SD,
   * `draw`, another of the equally good turns and shifts of the pupil grids (what the rows' sampling noise is measured
   * by: two draws differ by it alone), and `growthCap`, another than ROTATION_STEP_GROWTH_CAP (1: one step everywhere).
   */
  grid?: { pupilStep: number; elevationsPerSd: number; draw?: number; growthCap?: number };
}

/**
 * The elevations of slice `slice` of ROTATION_SLICES (all of them when undefined), relative to the sun's, in degrees,
 * each with its place k in the whole grid (which sets its pupil grid's turn and offset).
 */
export function rotationElevationsDeg(sdDeg: number, slice?: number, elevationsPerSd = ROTATION_ELEVATIONS_PER_SD): { offsetDeg: number; k: number }[] {
  const step = sdDeg / elevationsPerSd;
  const m = Math.round(ROTATION_SPAN_SD * elevationsPerSd);
  const all = Array.from({ length: 2 * m + 1 }, (_, k) => ({ offsetDeg: (k - m) * step, k }));
  if (slice === undefined) return all;
  const per = Math.ceil(all.length / ROTATION_SLICES);
  return all.slice(slice * per, (slice + 1) * per);
}

/**
 * |S1|², |S2|² (the field ⟂ and ∥ to the scattering plane, summed over both incident polarisations: an unpolarised
 * sun's two halves, as the plane engine's rows) of each drop, canting mean over the elevations of `slice` (all when
 * undefined: the slices' rows add up to it), on bins of width stepDeg centred on thetaDeg. The same units as
 * lib/bow/shaped-plane-rows.ts shapedPlaneRow: power per unit solid angle times x².
 */
export function rotationCantingRows(
  setup: RotationSetup,
  drops: readonly RotationDrop[],
  thetaDeg: Float64Array,
  stepDeg: number,
  slice?: number,
): { perp: Float64Array; par: Float64Array }[] {
  return rotationCantingRowsAlong(setup, [setup.arcPositionDeg], drops, thetaDeg, stepDeg, slice)[0];
}

/**
 * rotationCantingRows at each of arcsDeg (setup.arcPositionDeg aside) from one pass: the rays and their traces do not
 * depend on the place on the bow, only their weights do (a camera view's places along the arc share them).
 */
export function rotationCantingRowsAlong(
  setup: RotationSetup,
  arcsDeg: readonly number[],
  drops: readonly RotationDrop[],
  thetaDeg: Float64Array,
  stepDeg: number,
  slice?: number,
): { perp: Float64Array; par: Float64Array }[][] {
  const { outline, sunElevationDeg, cantingSdDeg } = setup;
  const count = thetaDeg.length;
  const fromDeg = thetaDeg[0] - stepDeg / 2;
  const arcs = arcsDeg.length;
  const rows = arcsDeg.map(() => drops.map(() => ({ perp: new Float64Array(count), par: new Float64Array(count) })));
  // Each drop's bows spread by its folds' Airy kernels: the light of order p ≥ 2 collected apart, on rows wider by the
  // kernels' reach on either side, so that light just outside the window spreads into it as it would.
  const kernels = setup.rayOnly ? null : arcsDeg.map((arc) => foldKernels(setup, arc, drops, stepDeg));
  // The margin from the drops alone, not the places, so that a place's rows are the same bits in any pass.
  const margin = kernels ? Math.max(...drops.flatMap((drop) => BOW_ORDERS.map((p) => widestReach(drop, p, stepDeg)))) : 0;
  const wide = count + 2 * margin;
  const wideFromDeg = fromDeg - margin * stepDeg;
  // Ray optics alone collects every order together, straight into the rows.
  const classes = kernels ? CLASSES.length : 1;
  const collected = kernels ? arcsDeg.map(() => drops.flatMap(() => CLASSES.map(() => ({ perp: new Float64Array(wide), par: new Float64Array(wide) })))) : rows;
  const nodes = chebyshevNodes(setup.indexSpan.min, setup.indexSpan.max, ROTATION_INDEX_NODES);
  const K = nodes.length;
  const D = drops.length;
  const weights = drops.map((drop) => lagrangeWeights(nodes, drop.mRe));
  const nearest = drops.map((drop) => nodes.reduce((best, n, k) => (Math.abs(n - drop.mRe) < Math.abs(nodes[best] - drop.mRe) ? k : best), 0));
  const reach = outline.maxRadius * 1.001;
  const duAtMode = setup.grid?.pupilStep ?? ROTATION_PUPIL_STEP;
  const growthCap = setup.grid?.growthCap ?? ROTATION_STEP_GROWTH_CAP;
  const elevationsPerSd = setup.grid?.elevationsPerSd ?? ROTATION_ELEVATIONS_PER_SD;
  const draw = setup.grid?.draw ?? 0;
  // Per node and order, the last traced ray; per drop, order and pupil sample along u, the row of rays.
  const at = { theta: new Float64Array(K * ORDERS), alpha: new Float64Array(K * ORDERS), perp: new Float64Array(K * ORDERS), par: new Float64Array(K * ORDERS), ok: new Uint8Array(K * ORDERS), unwrapped: new Float64Array(K), density: new Float64Array(arcs * K) };
  // The rays of this row of the pupil and of the row before (cells between them are spread as two triangles each), made
  // once for the finest elevation's grid (the mode's step: rotationPupilStep never makes it finer) and reused by the rest.
  const widest = D * ORDERS * Math.ceil((2 * reach) / duAtMode);
  const rowRays = (): RowRays => ({ theta: new Float64Array(widest), weight: new Float64Array(arcs * widest), live: new Uint8Array(arcs * widest), perp: new Float64Array(widest), par: new Float64Array(widest), alpha: new Float64Array(widest), ok: new Uint8Array(widest) });
  let ray = rowRays();
  let before = rowRays();
  const density = new Float64Array(Math.round(360 / AZIMUTH_STEP_DEG) + 2);
  const lo = fromDeg - JOIN_THETA_DEG;
  const hi = fromDeg + count * stepDeg + JOIN_THETA_DEG;
  const elevationStepDeg = cantingSdDeg / elevationsPerSd;
  for (const { offsetDeg, k: place } of rotationElevationsDeg(cantingSdDeg, slice, elevationsPerSd)) {
    const elevationDeg = sunElevationDeg + offsetDeg;
    const du = rotationPupilStep(duAtMode, offsetDeg / cantingSdDeg, growthCap);
    const cells = Math.ceil((2 * reach) / du);
    const size = D * ORDERS * cells;
    // Each elevation's pupil grid turned by the golden angle and shifted by the R2 sequence from the one before, so that
    // the combs a square grid leaves where the rays of one grid line fold over in Θ fall elsewhere at each elevation
    // and average out (for a sphere every elevation sees the same drop, and an unturned grid left a comb 1.7° apart
    // at 0.5 of the ∥ row's peak, test/lib/bow/canting-rotation.test.ts).
    const turn = place + draw * DRAW_STRIDE;
    const turnDeg = 90 + turn * GOLDEN_ANGLE_DEG;
    const shiftU = (((turn * R2_STEPS[0]) % 1) - 0.5) * du;
    const shiftV = (((turn * R2_STEPS[1]) % 1) - 0.5) * du;
    let peak = 0;
    for (let i = 0; i < density.length; i++) {
      density[i] = tiltDensity(sunElevationDeg, cantingSdDeg, elevationDeg, -180 + i * AZIMUTH_STEP_DEG);
      peak = Math.max(peak, density[i]);
    }
    const floor = LIVE_DENSITY_SHARE * peak;
    const live = liveAlphaBins(density, floor, arcsDeg);
    const densityAt = (arc: number, alphaDeg: number): number => {
      const azimuth = ((((arcsDeg[arc] - alphaDeg + 180) % 360) + 360) % 360) - 180;
      const f = (azimuth + 180) / AZIMUTH_STEP_DEG;
      const i = Math.min(density.length - 2, Math.floor(f));
      const value = density[i] + (f - i) * (density[i + 1] - density[i]);
      return value < floor ? 0 : value;
    };
    // The upright drop and the sunlight are mirror images of themselves across the vertical plane of d_in (y = 0): a ray
    // entering at y < 0 is the mirror of one entering at −y, with the same Θ and powers and its α negated (a mirror keeps
    // the field's parts ⟂ and ∥ to the mirrored scattering plane). So only rays entering at y ≥ 0 are traced, each
    // weighed for itself and its mirror (common practice: a symmetry of the scatterer halves the integral).
    const pairDensityAt = (arc: number, alphaDeg: number): number => densityAt(arc, alphaDeg) + densityAt(arc, -alphaDeg);
    // The plane only sets the pupil's frame: rays at u·e + v·N, launched along d_in.
    const plane = bowScatteringPlane(elevationDeg, turnDeg);
    const tracers = nodes.map((n) => shapedPlaneTracer({ outline, axis: [0, 0, 1], n }, plane, { rayOrders: [0, 1], bowOrders: [2, 3] }));
    const h = elevationDeg * DEG;
    const dIn = plane.dIn;
    // t̂, the upward unit vector ⟂ d_in (bow-geometry.ts), from which α is measured.
    const up = [Math.sin(h), 0, Math.cos(h)] as const;
    // y of the pupil's axes e and N = d_in × e (d_in has no y part: bow-geometry.ts).
    const eY = plane.e[1];
    const nY = dIn[2] * plane.e[0] - dIn[0] * plane.e[2];
    // Power·du² · Δh′ over the bin's Θ width (radians), times the density per degree² at each ray (canting-pupil's scale).
    const scale = (du * du * elevationStepDeg) / (DEG * stepDeg * DEG);
    before.ok.fill(0);
    for (let iv = 0; iv <= cells; iv++) {
      const v = -reach + (iv + 0.5) * du + shiftV;
      const uMax = Math.sqrt(Math.max(0, reach * reach - v * v));
      ray.ok.fill(0);
      for (let iu = 0; iu < cells; iu++) {
        const u = -reach + (iu + 0.5) * du + shiftU;
        if (iv === cells || Math.abs(u) > uMax) continue;
        // A ray beside the mirror plane on its far side is traced too, weighed 0: the cells between it and its near
        // neighbours are then spread as in the whole pupil, not left as single angles.
        const far = u * eY + v * nY < 0;
        if (far && (u - du) * eY + v * nY < 0 && (u + du) * eY + v * nY < 0) continue;
        let any = traceNode(tracers[0], u, v, 0, dIn, up, lo, hi, at);
        // A ray that misses the drop misses it at every index.
        if (!tracers[0].lastTrace.hit) continue;
        if (!anyLive(at, live, lo, hi)) continue;
        for (let k = 1; k < K; k++) any = traceNode(tracers[k], u, v, k, dIn, up, lo, hi, at) || any;
        if (any) interpolateRays(at, K, D, arcs, weights, nearest, iu, cells, ray, pairDensityAt, far ? 0 : scale, lo, hi);
      }
      // The cells between the row before and this one (past the last row, an empty one).
      depositCells(before, ray, size, D, cells, collected, classes, wideFromDeg, stepDeg);
      [before, ray] = [ray, before];
    }
  }
  if (kernels) {
    rows.forEach((arcRows, a) =>
      arcRows.forEach((row, d) => {
        const [rest, ...bows] = CLASSES.map((c) => collected[a][d * CLASSES.length + c]);
        for (let j = 0; j < count; j++) {
          row.perp[j] = rest.perp[margin + j];
          row.par[j] = rest.par[margin + j];
        }
        bows.forEach((bow, b) => {
          spreadWithAiry(bow.perp, kernels[a][d][b], row.perp, margin);
          spreadWithAiry(bow.par, kernels[a][d][b], row.par, margin);
        });
      }),
    );
  }
  for (const arcRows of rows) {
    arcRows.forEach((row, d) => {
      const x2 = drops[d].x * drops[d].x;
      for (let j = 0; j < count; j++) {
        const solid = x2 / Math.sin((fromDeg + (j + 0.5) * stepDeg) * DEG);
        row.perp[j] *= solid;
        row.par[j] *= solid;
      }
    });
  }
  return rows;
}

/**
 * Which 1° bins of exit α (bin b holds α in [b − 180°, b − 179°)) any place asked for takes light from at this
 * elevation, as running counts (live[b + 1] − live[a]: the live bins among a..b): those of an α = A − δ where the
 * density over azimuth δ is at least `floor`.
 */
function liveAlphaBins(density: Float64Array, floor: number, arcsDeg: readonly number[]): Int32Array {
  const bins = new Uint8Array(360);
  for (let i = 0; i < density.length; i++) {
    if (density[i] < floor) continue;
    const azimuth = -180 + i * AZIMUTH_STEP_DEG;
    for (const arc of arcsDeg) bins[alphaBin(arc - azimuth)] = 1;
  }
  const counts = new Int32Array(361);
  for (let b = 0; b < 360; b++) counts[b + 1] = counts[b] + bins[b];
  return counts;
}

function alphaBin(alphaDeg: number): number {
  return (((Math.floor(alphaDeg) + 180) % 360) + 360) % 360;
}

/** Whether any bin within marginDeg of alphaDeg is live (counts from liveAlphaBins; the circle wraps at ±180°). */
function liveNear(counts: Int32Array, alphaDeg: number, marginDeg: number): boolean {
  if (marginDeg >= 179) return counts[360] > 0;
  const a = alphaBin(alphaDeg - marginDeg);
  const b = alphaBin(alphaDeg + marginDeg);
  return a <= b ? counts[b + 1] - counts[a] > 0 : counts[360] - counts[a] + counts[b + 1] > 0;
}

/**
 * Whether the first index node's exits of a ray that meets the drop may give light to a place asked for: an order
 * that does not leave at that node (the rim, total reflection: it may at another), or one that leaves within
 * LIVE_MARGIN_DEG of the window and near a live bin of α (LIVE_MARGIN_DEG / sin ψ), or near the antisolar point.
 */
function anyLive(at: NodeRays, live: Int32Array, lo: number, hi: number): boolean {
  for (let p = 0; p < ORDERS; p++) {
    if (at.ok[p] !== 1) return true;
    const theta = at.theta[p];
    if (theta < lo - LIVE_MARGIN_DEG || theta > hi + LIVE_MARGIN_DEG) continue;
    const psi = 180 - theta;
    if (psi <= LIVE_NEAR_ANTISOLAR_DEG) return true;
    const margin = LIVE_MARGIN_DEG / Math.sin(psi * DEG);
    // The ray stands for its mirror too (α negated).
    if (liveNear(live, at.alpha[p], margin) || liveNear(live, -at.alpha[p], margin)) return true;
  }
  return false;
}

type NodeRays = { theta: Float64Array; alpha: Float64Array; perp: Float64Array; par: Float64Array; ok: Uint8Array; unwrapped: Float64Array; density: Float64Array };
/** weight: a ray's power weight at each place (the tilts' density times the pupil's scale); live: whether that place takes light from its exit at all (the density above the cut). */
type RowRays = { theta: Float64Array; alpha: Float64Array; perp: Float64Array; par: Float64Array; ok: Uint8Array; weight: Float64Array; live: Uint8Array };

/**
 * Traces pupil point (u, v) at node k and keeps each order's exit: Θ, α (the observer looks back along the ray, s = −d_out,
 * α = atan2(s·ŷ, s·t̂): lib/rays/bow-geometry.ts's w(α)) and the power of the field ⟂ and ∥ to the plane of d_in and
 * d_out, summed over the two incident fields. Whether any order lands within [lo, hi] of Θ.
 */
function traceNode(tracer: PlaneTracer, u: number, v: number, k: number, dIn: readonly number[], up: readonly number[], lo: number, hi: number, at: NodeRays): boolean {
  tracer.traceAt(u, v, ORDERS - 1, false);
  const rec = tracer.lastTrace.orders;
  let any = false;
  for (let p = 0; p < ORDERS; p++) {
    const s = k * ORDERS + p;
    at.ok[s] = 0;
    const base = p * ORDER_STRIDE;
    if (rec[base + AT.valid] !== 1) continue;
    const dx = rec[base + AT.dir];
    const dy = rec[base + AT.dir + 1];
    const dz = rec[base + AT.dir + 2];
    const cosTheta = Math.max(-1, Math.min(1, dx * dIn[0] + dy * dIn[1] + dz * dIn[2]));
    const theta = Math.acos(cosTheta) / DEG;
    at.ok[s] = 1;
    at.theta[s] = theta;
    at.alpha[s] = Math.atan2(-dy, -(dx * up[0] + dz * up[2])) / DEG;
    // N̂ = d_in × d_out / sin Θ: the scattering plane's normal (the ⟂ direction of its field).
    const nx = dIn[1] * dz - dIn[2] * dy;
    const ny = dIn[2] * dx - dIn[0] * dz;
    const nz = dIn[0] * dy - dIn[1] * dx;
    const norm = Math.hypot(nx, ny, nz);
    let total = 0;
    let perp = 0;
    for (const field of EXIT_FIELDS) {
      const at3 = base + field;
      const fx = rec[at3];
      const fy = rec[at3 + 1];
      const fz = rec[at3 + 2];
      total += fx * fx + fy * fy + fz * fz;
      if (norm > 0) perp += ((fx * nx + fy * ny + fz * nz) / norm) ** 2;
    }
    at.perp[s] = perp;
    at.par[s] = total - perp;
    if (theta >= lo && theta <= hi) any = true;
  }
  return any;
}

/**
 * Each drop's rays at pupil sample iu from the nodes' rays: Lagrange-interpolated in n where the order leaves at every
 * node, else the nearest node's ray (an order that starts or ends between nodes, at the rim or by total reflection:
 * Θ then off by at most one node's shift, about 0.4°, on a sliver of the pupil), weighed by `densityAt` its α (the
 * tilt density there and at its mirror's −α; interpolated in n as the ray is: it is smooth in α on the scale of σ). An order whose rays land outside [lo, hi]
 * at every node is left out.
 */
function interpolateRays(
  at: NodeRays,
  K: number,
  D: number,
  arcs: number,
  weights: readonly Float64Array[],
  nearest: readonly number[],
  iu: number,
  cells: number,
  ray: RowRays,
  densityAt: (arc: number, alphaDeg: number) => number,
  scale: number,
  lo: number,
  hi: number,
): void {
  const size = D * ORDERS * cells;
  for (let p = 0; p < ORDERS; p++) {
    let all = true;
    let inside = false;
    for (let k = 0; k < K; k++) {
      const q = k * ORDERS + p;
      all = all && at.ok[q] === 1;
      inside = inside || (at.ok[q] === 1 && at.theta[q] >= lo && at.theta[q] <= hi);
    }
    if (!inside) continue;
    if (all) {
      // α unwrapped about node 0's (the foot of the bow is at ±180°), and the density at each node's ray.
      const alpha0 = at.alpha[p];
      for (let k = 0; k < K; k++) {
        const q = k * ORDERS + p;
        const turn = at.alpha[q] - alpha0;
        at.unwrapped[k] = alpha0 + (turn > 180 ? turn - 360 : turn < -180 ? turn + 360 : turn);
        for (let a = 0; a < arcs; a++) at.density[a * K + k] = densityAt(a, at.alpha[q]);
      }
    }
    for (let d = 0; d < D; d++) {
      const s = (d * ORDERS + p) * cells + iu;
      const near = nearest[d] * ORDERS + p;
      if (all) {
        const w = weights[d];
        let theta = 0;
        let alpha = 0;
        let perp = 0;
        let par = 0;
        for (let k = 0; k < K; k++) {
          const q = k * ORDERS + p;
          theta += w[k] * at.theta[q];
          alpha += w[k] * at.unwrapped[k];
          perp += w[k] * at.perp[q];
          par += w[k] * at.par[q];
        }
        ray.theta[s] = theta;
        ray.alpha[s] = alpha;
        ray.perp[s] = Math.max(0, perp);
        ray.par[s] = Math.max(0, par);
        for (let a = 0; a < arcs; a++) {
          let density = 0;
          for (let k = 0; k < K; k++) density += w[k] * at.density[a * K + k];
          ray.weight[a * size + s] = scale * Math.max(0, density);
          ray.live[a * size + s] = density > 0 ? 1 : 0;
        }
      } else if (at.ok[near]) {
        ray.theta[s] = at.theta[near];
        ray.alpha[s] = at.alpha[near];
        ray.perp[s] = at.perp[near];
        ray.par[s] = at.par[near];
        for (let a = 0; a < arcs; a++) {
          const density = densityAt(a, at.alpha[near]);
          ray.weight[a * size + s] = scale * density;
          ray.live[a * size + s] = density > 0 ? 1 : 0;
        }
      } else continue;
      ray.ok[s] = 1;
    }
  }
}

/**
 * Spreads the power of the pupil cells between two rows of rays (above, below) into the drops' rows at each place on the
 * bow (rows[a], the rays' weights there from a·size on; `classes` rows per drop: 1, every order in one, or 3, orders 0–1,
 * 2 and 3 apart). Each ray's power stands for the du² of pupil around it, a
 * quarter in each of the four cells it is a corner of. A cell whose four corners left and lie within JOIN_THETA_DEG of
 * each other is spread as its two triangles (lib/bow/triangle-bins.ts), half its corners' quarters each; at the rim (or
 * the window's edge) a cell with three corners as their triangle, with two on a side along that side, the shares of the
 * corners it has; in any other cell each corner's quarter stays at its own Θ. For each place a cell has only the corners
 * that place takes light from (RowRays.live: the tilts' density at their exit is above the cut; a ray's own weight may
 * still be 0, as on the mirror plane's far side), so that a place's rows do not depend on which other places share the
 * pass: a ray whose exits give one place no light is traced at every index in a pass with other places, and not in a
 * pass for that place alone. A cell's shares of the bins are found once for the places with the same corners.
 */
function depositCells(
  above: RowRays,
  below: RowRays,
  size: number,
  D: number,
  cells: number,
  rows: { perp: Float64Array; par: Float64Array }[][],
  classes: number,
  fromDeg: number,
  stepDeg: number,
): void {
  const count = rows[0][0].perp.length;
  const toDeg = fromDeg + count * stepDeg;
  const arcs = rows.length;
  const slot = new Int32Array(4);
  // The angles of a place's corners, in their order round the cell.
  const t = new Float64Array(4);
  const quarterPerp = new Float64Array(4);
  const quarterPar = new Float64Array(4);
  const shareA = new TriangleShares(count);
  const shareB = new TriangleShares(count);
  const raysOf = (c: number): RowRays => (c < 2 ? above : below);
  for (let d = 0; d < D; d++) {
    for (let p = 0; p < ORDERS; p++) {
      const first = (d * ORDERS + p) * cells;
      for (let iu = -1; iu < cells; iu++) {
        // Corners round the cell: above iu, above iu + 1, below iu + 1, below iu (−1: none).
        const left = first + iu;
        const right = left + 1;
        slot[0] = iu >= 0 && above.ok[left] ? left : -1;
        slot[1] = iu + 1 < cells && above.ok[right] ? right : -1;
        slot[2] = iu + 1 < cells && below.ok[right] ? right : -1;
        slot[3] = iu >= 0 && below.ok[left] ? left : -1;
        if (slot[0] < 0 && slot[1] < 0 && slot[2] < 0 && slot[3] < 0) continue;
        // For one place, cells it takes no light from (corners all weighed 0) are passed over first; for several, the
        // test cost more than it saved (9 places, 2 mm drops, 41 wavelengths: 11.5–12.2 s against 9.6–9.8 s of CPU).
        if (arcs === 1) {
          let weighed = false;
          for (let c = 0; c < 4; c++) if (slot[c] >= 0 && raysOf(c).weight[slot[c]] > 0) weighed = true;
          if (!weighed) continue;
        }
        let lo = Infinity;
        let hi = -Infinity;
        for (let c = 0; c < 4; c++) {
          if (slot[c] < 0) continue;
          const theta = raysOf(c).theta[slot[c]];
          lo = Math.min(lo, theta);
          hi = Math.max(hi, theta);
        }
        if (hi < fromDeg - JOIN_THETA_DEG || lo > toDeg + JOIN_THETA_DEG) continue;
        // The corners (bits 0–3) whose shares were last found.
        let sharesMask = -1;
        for (let a = 0; a < arcs; a++) {
          let mask = 0;
          for (let c = 0; c < 4; c++) if (slot[c] >= 0 && raysOf(c).live[a * size + slot[c]]) mask |= 1 << c;
          if (mask === 0) continue;
          let ePerp = 0;
          let ePar = 0;
          let present = 0;
          let tLo = Infinity;
          let tHi = -Infinity;
          for (let c = 0; c < 4; c++) {
            quarterPerp[c] = 0;
            quarterPar[c] = 0;
            if (!(mask & (1 << c))) continue;
            const rays = raysOf(c);
            const w = 0.25 * rays.weight[a * size + slot[c]];
            quarterPerp[c] = w * rays.perp[slot[c]];
            quarterPar[c] = w * rays.par[slot[c]];
            ePerp += quarterPerp[c];
            ePar += quarterPar[c];
            const theta = rays.theta[slot[c]];
            t[present++] = theta;
            tLo = Math.min(tLo, theta);
            tHi = Math.max(tHi, theta);
          }
          if (ePerp === 0 && ePar === 0) continue;
          // Two corners are spread only along a side (one of corners 0 and 2 with one of 1 and 3); a whole cell as the
          // triangles (t0, t1, t2) and (t0, t2, t3), three corners as theirs.
          const opposite = present === 2 && !(mask & 1) === !(mask & 4);
          const shape = tHi - tLo >= JOIN_THETA_DEG || present === 1 || opposite ? "points" : present === 2 ? "side" : present === 3 ? "triangle" : "cell";
          const half = shape === "cell" ? 0.5 : 1;
          const { perp, par } = rows[a][d * classes + (classes === 1 ? 0 : orderClass(p))];
          if (shape === "points") {
            for (let c = 0; c < 4; c++) {
              if (!(mask & (1 << c))) continue;
              const theta = raysOf(c).theta[slot[c]];
              depositOverInterval(perp, quarterPerp[c], theta, theta, fromDeg, stepDeg);
              depositOverInterval(par, quarterPar[c], theta, theta, fromDeg, stepDeg);
            }
          } else if (shape === "side") {
            depositOverInterval(perp, ePerp, t[0], t[1], fromDeg, stepDeg);
            depositOverInterval(par, ePar, t[0], t[1], fromDeg, stepDeg);
          } else if (arcs === 1) {
            // One place: straight into its rows (finding the shares first and adding them cost 4.7 s against 4.0 s of CPU
            // for 2 mm drops at 41 wavelengths).
            depositOverTriangle(perp, half * ePerp, par, half * ePar, t[0], t[1], t[2], fromDeg, stepDeg);
            if (shape === "cell") depositOverTriangle(perp, half * ePerp, par, half * ePar, t[0], t[2], t[3], fromDeg, stepDeg);
          } else {
            // The triangles' shares found once for the places with these corners, added as depositOverTriangle adds
            // them (the same bits).
            if (mask !== sharesMask) {
              shareA.reset();
              shareB.reset();
              shareA.find(t[0], t[1], t[2], fromDeg, stepDeg);
              if (shape === "cell") shareB.find(t[0], t[2], t[3], fromDeg, stepDeg);
              sharesMask = mask;
            }
            shareA.addTo(perp, half * ePerp, par, half * ePar);
            if (shape === "cell") shareB.addTo(perp, half * ePerp, par, half * ePar);
          }
        }
      }
    }
  }
}

/** A pupil triangle's shares of the bins (depositOverTriangle of unit energy), found once and added for each place. */
class TriangleShares {
  readonly values: Float64Array;
  from = 0;
  to = -1;
  constructor(count: number) {
    this.values = new Float64Array(count);
  }
  reset(): void {
    for (let j = this.from; j <= this.to; j++) this.values[j] = 0;
    this.from = 0;
    this.to = -1;
  }
  find(a: number, b: number, c: number, firstEdgeDeg: number, stepDeg: number): void {
    this.from = Math.max(0, Math.floor((Math.min(a, b, c) - firstEdgeDeg) / stepDeg));
    this.to = Math.min(this.values.length - 1, Math.floor((Math.max(a, b, c) - firstEdgeDeg) / stepDeg));
    depositOverTriangle(this.values, 1, this.values, 0, a, b, c, firstEdgeDeg, stepDeg);
  }
  /** As depositOverTriangle(perp, ePerp, par, ePar, …) of this triangle adds. */
  addTo(perp: Float64Array, ePerp: number, par: Float64Array, ePar: number): void {
    if (ePerp === 0 && ePar === 0) return;
    for (let j = this.from; j <= this.to; j++) {
      const v = this.values[j];
      if (v === 0) continue;
      perp[j] += ePerp * v;
      par[j] += ePar * v;
    }
  }
}
