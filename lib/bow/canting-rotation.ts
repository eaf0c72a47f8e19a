// The canting mean of a flattened drop's rows by rotation over the upright drop's pupil, with no rule of tilt nodes.
// A drop whose axis has elevation h′ below the sunlight and azimuth δ about it sends into the plane at arc position A
// what the upright drop, with the sun at h′, sends to A − δ (lib/drops/shape/tilt-density.ts). So the mean over the
// tilts is ∫∫ p(h′, δ)·I(Θ, A − δ; h′) dh′ dδ: for each h′ on a grid, every ray of a square grid over the upright
// drop's pupil is traced once and its power, weighed by p(h′, A − α) at the arc position α where it leaves, spread
// over Θ along the segments to its neighbours in u (half a cell each way, uniform in Θ between the two rays, as
// lib/bow/plane-ray-bins.ts spreads a sweep's segments; van de Hulst 1957 §12.22: the power of a bundle of rays is kept
// along it). Ray optics, orders 0–3; the bows' wave structure is left out, which for drops above 1 mm canted by a few
// degrees and seen through the sun's disc moves rows by ≤ 0.03 of their peak (Airy-type planes on a dense tilt grid
// against brute force over the pupil: BENCHMARKS.md canting-spread). Rows at each wavelength come from rays traced at
// a few refractive indices: each ray's Θ, α and powers are smooth in n (Snell's law at each face), so they are
// interpolated ray by ray (Lagrange's form, Press et al. 2007 Eq. 3.2.1).

import type { DropOutline } from "../drops/shape/outline.js";
import { tiltDensity } from "../drops/shape/tilt-density.js";
import { bowScatteringPlane } from "../rays/bow-geometry.js";
import { AT, ORDER_STRIDE } from "../rays/shape-tracer.js";
import { chebyshevNodes, lagrangeWeights } from "../rays/sweep-interpolation.js";
import { shapedPlaneTracer } from "./shaped-plane-rows.js";
import { depositOverInterval } from "./ray-bins.js";
import type { PlaneTracer } from "../rays/plane-sweep.js";

const DEG = Math.PI / 180;
/** Orders traced: reflection, transmission, the primary's and the secondary's. */
const ORDERS = 4;
/** The exit fields a trace keeps per order (real and imaginary parts for each incident polarisation: shape-tracer.ts AT). */
const EXIT_FIELDS = [AT.e1Re, AT.e1Im, AT.e2Re, AT.e2Im] as const;

/**
 * The grid of the mean. Measured at 550 nm against brute force over the pupil (pupil step 0.005, elevations 0.5° apart,
 * point bins: bench/canting-pupil.ts) after the sun's disc, worst share of the peak / summed (BENCHMARKS.md
 * canting-splat, 1–2.5 mm drops at the top, side and between): pupil step 0.02 gives 0.057–0.097 / 0.018–0.051 up to
 * 2 mm and 0.166 / 0.081 at 2.5 mm, at about the CPU the canting rules took for a shape at 41 wavelengths (whose errors
 * there were 0.19–1.18 / 0.10–0.38); 0.014 gives 0.019–0.058 / 0.014–0.040 and 0.146 / 0.056 at twice the rays, 0.01
 * 0.018–0.057 / 0.011–0.039 at four times. Elevations σ/7.5 apart (1° at σ 7.5°) over ±3.5σ, which leaves out 5e-4
 * of the tilts' mass: σ/3.75 apart left up to 0.173 / 0.043 at the top.
 */
export const ROTATION_PUPIL_STEP = 0.02;
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
/** The elevations are computed in this many slices (parts of a kernel task on the pool's threads). */
export const ROTATION_SLICES = 4;
/** The golden angle 180°(3 − √5) and the R2 sequence's steps 1/g, 1/g² (g the plastic number, the real root of g³ = g + 1): low-discrepancy turns and shifts (common practice). */
const GOLDEN_ANGLE_DEG = 180 * (3 - Math.sqrt(5));
const R2_STEPS = [0.7548776662466927, 0.5698402909980532] as const;
/** Step of the table of the tilt density over azimuth, degrees (linear interpolation between). */
const AZIMUTH_STEP_DEG = 0.05;
/**
 * Neighbouring rays further apart than this in Θ (degrees) or α are not joined by a segment: a rim or a jump of the
 * ray between them (each then stands as a point). A joined pair's Θ differs by ≤ 0.5° at pupil step 0.02 except at
 * the rim, where Θ turns as the square root of the distance to it.
 */
const JOIN_THETA_DEG = 3;
const JOIN_ALPHA_DEG = 20;
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
  /** Benchmarks only: another pupil step and density of elevations than ROTATION_PUPIL_STEP and ROTATION_ELEVATIONS_PER_SD. */
  grid?: { pupilStep: number; elevationsPerSd: number };
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
  const nodes = chebyshevNodes(setup.indexSpan.min, setup.indexSpan.max, ROTATION_INDEX_NODES);
  const K = nodes.length;
  const D = drops.length;
  const weights = drops.map((drop) => lagrangeWeights(nodes, drop.mRe));
  const nearest = drops.map((drop) => nodes.reduce((best, n, k) => (Math.abs(n - drop.mRe) < Math.abs(nodes[best] - drop.mRe) ? k : best), 0));
  const reach = outline.maxRadius * 1.001;
  const du = setup.grid?.pupilStep ?? ROTATION_PUPIL_STEP;
  const elevationsPerSd = setup.grid?.elevationsPerSd ?? ROTATION_ELEVATIONS_PER_SD;
  const cells = Math.ceil((2 * reach) / du);
  // Per node and order, the last traced ray; per drop, order and pupil sample along u, the row of rays.
  const at = { theta: new Float64Array(K * ORDERS), alpha: new Float64Array(K * ORDERS), perp: new Float64Array(K * ORDERS), par: new Float64Array(K * ORDERS), ok: new Uint8Array(K * ORDERS), unwrapped: new Float64Array(K), density: new Float64Array(arcs * K) };
  const size = D * ORDERS * cells;
  const ray = { theta: new Float64Array(size), weight: new Float64Array(arcs * size), perp: new Float64Array(size), par: new Float64Array(size), alpha: new Float64Array(size), ok: new Uint8Array(size) };
  const density = new Float64Array(Math.round(360 / AZIMUTH_STEP_DEG) + 2);
  const lo = fromDeg - JOIN_THETA_DEG;
  const hi = fromDeg + count * stepDeg + JOIN_THETA_DEG;
  const elevationStepDeg = cantingSdDeg / elevationsPerSd;
  for (const { offsetDeg, k: place } of rotationElevationsDeg(cantingSdDeg, slice, elevationsPerSd)) {
    const elevationDeg = sunElevationDeg + offsetDeg;
    // Each elevation's pupil grid turned by the golden angle and shifted by the R2 sequence from the one before, so that
    // the combs a square grid leaves where the rays of one grid line fold over in Θ fall elsewhere at each elevation
    // and average out (for a sphere every elevation sees the same drop, and an unturned grid left a comb 1.7° apart
    // at 0.5 of the ∥ row's peak, test/lib/bow/canting-rotation.test.ts).
    const turnDeg = 90 + place * GOLDEN_ANGLE_DEG;
    const shiftU = (((place * R2_STEPS[0]) % 1) - 0.5) * du;
    const shiftV = (((place * R2_STEPS[1]) % 1) - 0.5) * du;
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
    // The plane only sets the pupil's frame: rays at u·e + v·N, launched along d_in.
    const plane = bowScatteringPlane(elevationDeg, turnDeg);
    const tracers = nodes.map((n) => shapedPlaneTracer({ outline, axis: [0, 0, 1], n }, plane, { rayOrders: [0, 1], bowOrders: [2, 3] }));
    const h = elevationDeg * DEG;
    const dIn = plane.dIn;
    // t̂, the upward unit vector ⟂ d_in (bow-geometry.ts), from which α is measured.
    const up = [Math.sin(h), 0, Math.cos(h)] as const;
    // Power·du² · Δh′ over the bin's Θ width (radians), times the density per degree² at each ray (canting-pupil's scale).
    const scale = (du * du * elevationStepDeg) / (DEG * stepDeg * DEG);
    for (let iv = 0; iv < cells; iv++) {
      const v = -reach + (iv + 0.5) * du + shiftV;
      const uMax = Math.sqrt(Math.max(0, reach * reach - v * v));
      ray.ok.fill(0);
      for (let iu = 0; iu < cells; iu++) {
        const u = -reach + (iu + 0.5) * du + shiftU;
        if (Math.abs(u) > uMax) continue;
        let any = traceNode(tracers[0], u, v, 0, dIn, up, lo, hi, at);
        // A ray that misses the drop misses it at every index.
        if (!tracers[0].lastTrace.hit) continue;
        if (!anyLive(at, live, lo, hi)) continue;
        for (let k = 1; k < K; k++) any = traceNode(tracers[k], u, v, k, dIn, up, lo, hi, at) || any;
        if (any) interpolateRays(at, K, D, arcs, weights, nearest, iu, cells, ray, densityAt, scale, lo, hi);
      }
      for (let a = 0; a < arcs; a++) depositRow(ray, a * size, D, cells, rows[a], fromDeg, stepDeg);
    }
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
    if (liveNear(live, at.alpha[p], LIVE_MARGIN_DEG / Math.sin(psi * DEG))) return true;
  }
  return false;
}

type NodeRays = { theta: Float64Array; alpha: Float64Array; perp: Float64Array; par: Float64Array; ok: Uint8Array; unwrapped: Float64Array; density: Float64Array };
type RowRays = { theta: Float64Array; alpha: Float64Array; perp: Float64Array; par: Float64Array; ok: Uint8Array; weight: Float64Array };

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
 * Θ then off by at most one node's shift, about 0.4°, on a sliver of the pupil), weighed by the tilt density at its α
 * (interpolated in n as the ray is: it is smooth in α on the scale of σ). An order whose rays land outside [lo, hi]
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
        }
      } else if (at.ok[near]) {
        ray.theta[s] = at.theta[near];
        ray.alpha[s] = at.alpha[near];
        ray.perp[s] = at.perp[near];
        ray.par[s] = at.par[near];
        for (let a = 0; a < arcs; a++) ray.weight[a * size + s] = scale * densityAt(a, at.alpha[near]);
      } else continue;
      ray.ok[s] = 1;
    }
  }
}

/**
 * Spreads one pupil row's rays into the drops' rows at one place on the bow (the rays' weights there from `weightAt`
 * on): half of each ray's power on the segment to each neighbour in u.
 */
function depositRow(ray: RowRays, weightAt: number, D: number, cells: number, rows: { perp: Float64Array; par: Float64Array }[], fromDeg: number, stepDeg: number): void {
  const toDeg = fromDeg + rows[0].perp.length * stepDeg;
  for (let d = 0; d < D; d++) {
    const { perp, par } = rows[d];
    for (let p = 0; p < ORDERS; p++) {
      const first = (d * ORDERS + p) * cells;
      for (let iu = 0; iu < cells; iu++) {
        const s = first + iu;
        const weight = ray.weight[weightAt + s];
        if (!ray.ok[s] || weight === 0) continue;
        const theta = ray.theta[s];
        // A segment reaches at most JOIN_THETA_DEG / 2 from its ray.
        if (theta < fromDeg - JOIN_THETA_DEG || theta > toDeg + JOIN_THETA_DEG) continue;
        const ePerp = 0.5 * weight * ray.perp[s];
        const ePar = 0.5 * weight * ray.par[s];
        for (let side = -1; side <= 1; side += 2) {
          const q = s + side;
          const t = iu + side;
          const joined = t >= 0 && t < cells && ray.ok[q] === 1 && Math.abs(ray.theta[q] - theta) < JOIN_THETA_DEG && Math.abs(ray.alpha[q] - ray.alpha[s]) < JOIN_ALPHA_DEG;
          const end = joined ? 0.5 * (theta + ray.theta[q]) : theta;
          depositOverInterval(perp, ePerp, theta, end, fromDeg, stepDeg);
          depositOverInterval(par, ePar, theta, end, fromDeg, stepDeg);
        }
      }
    }
  }
}
