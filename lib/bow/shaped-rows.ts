// |S1|², |S2|² of one flattened drop at one wavelength and one place on the bow, averaged over the drops'
// canting: the engine behind kernel rows for drops that are not spheres (lib/bow/kernel-rows.ts).

import { cantingNodesFive } from "../drops/shape/canting.js";
import { equilibriumOutline } from "../drops/shape/equilibrium-shape.js";
import { spheroidOutline, type DropOutline } from "../drops/shape/outline.js";
import { shapeNodeWeights } from "../drops/shape/shape-nodes.js";
import { bowScatteringPlane, cantedAxis } from "../rays/bow-geometry.js";
import { chebyshevNodes, interpolateSweep } from "../rays/sweep-interpolation.js";
import { WATER_INDEX_RANGE } from "../water/index-range.js";
import { contextFromSweeps, shapedPlaneRow, shapedPlaneSweeps, shapedPlaneTracer } from "./shaped-plane-rows.js";

/** Drops below this radius stay spheres under "equilibrium": see EQUILIBRIUM_NOTE. */
export const FLATTENED_FROM_RADIUS_UM = 150;
export const EQUILIBRIUM_NOTE =
  "below 150 µm radius 1 − axis ratio < 5e-4 (equilibrium shapes scaled as Pruppacher & Pitter 1971 measured), which moves the top of the bow by < 0.05° (measured on spheroids: about 1° per 0.01 of flattening): those drops are spheres";

/**
 * Sun elevation and arc position are rounded to these steps for the kernel rows and their cache keys. Measured
 * on 2 mm drops (axis ratio 0.93, sun 10°): the fold angles move by 0.22° per degree of arc position at arc 45°
 * (most) and by 0.24° per degree of sun elevation, so half a step moves them by at most 0.055° and 0.03°. In colour
 * (bench/shape-colour.ts, BENCHMARKS.md): one step moves a profile of 2 mm drops at arc 45° by ΔE2000 up to 15 (sun)
 * and 29 (arc) at the bow's sharp edge, 1.1 and 1.9 on average: half a step is then ~7 and ~14 at worst, so a
 * worst of 0.5 would need steps 15–30× finer (the mean, ~2×).
 */
export const SUN_ELEVATION_STEP_DEG = 0.25;
export const ARC_POSITION_STEP_DEG = 0.5;

export interface ShapedRowSpec {
  kind: "equilibrium" | "spheroid";
  /** Spheroids only: vertical over horizontal axis. */
  axisRatio?: number;
  /**
   * Equilibrium only: each radius's row is blended from the rows, at its own size, of the two shape nodes this far
   * apart in deformation 1 − q that bracket its shape (lib/drops/shape/shape-nodes.ts), so that radii share traced
   * planes; 0 or absent (what the service asks for: the colour this costs is measured in BENCHMARKS.md, shape-nodes):
   * every radius its own shape.
   */
  deformationStep?: number;
  cantingSdDeg: number;
  sunElevationDeg: number;
  arcPositionDeg: number;
  /** True: ray optics only (method "geometric"); false: Airy-type bows. */
  rayOnly: boolean;
  /**
   * Benchmarks and tests only: each plane traced at the drop's own index instead of interpolated from TRACED_INDICES
   * (the reference the interpolation is measured against).
   */
  traceEveryIndex?: boolean;
}

export function quantiseSpec(spec: ShapedRowSpec): ShapedRowSpec {
  return {
    ...spec,
    sunElevationDeg: Math.round(spec.sunElevationDeg / SUN_ELEVATION_STEP_DEG) * SUN_ELEVATION_STEP_DEG,
    arcPositionDeg: Math.round(spec.arcPositionDeg / ARC_POSITION_STEP_DEG) * ARC_POSITION_STEP_DEG,
  };
}

/**
 * Version of the flattened-drop engine's numbers, in its rows' cache keys: raised when they change (4: every plane
 * interpolated from planes traced at the fixed TRACED_INDICES; 3: a task's wavelengths share planes traced at
 * INDEX_NODES indices across the task's own range; 2: bow pairs read off the sweep, rows move by ≤ 2e-3
 * relative), so that only these rows are recomputed, not every kernel row. Rows on shape nodes (deformationStep) carry
 * the step in their key.
 */
export const SHAPED_ENGINE_VERSION = 4;

/** The part of a kernel row's cache key that tells what shape and geometry it was computed for. */
export function shapedRowKey(spec: ShapedRowSpec): string {
  const shape = spec.kind === "spheroid" ? `q${spec.axisRatio}` : spec.deformationStep ? `eq${spec.deformationStep}` : "eq";
  const direct = spec.traceEveryIndex ? ":direct" : "";
  return `shape${SHAPED_ENGINE_VERSION}:${shape}:c${spec.cantingSdDeg}:s${spec.sunElevationDeg}:a${spec.arcPositionDeg}:${spec.rayOnly ? "rays" : "airy"}${direct}`;
}

/** A kernel row variant (rowVariant) with the shape of a drop that is not a sphere appended: its rows are other rows. */
export function shapedVariant(variant: string, shape: ShapedRowSpec | undefined): string {
  return shape ? `${variant}|${shapedRowKey(shape)}` : variant;
}

export function outlineFor(spec: Pick<ShapedRowSpec, "kind" | "axisRatio">, radiusUm: number): DropOutline {
  return spec.kind === "spheroid" ? spheroidOutline(spec.axisRatio!) : equilibriumOutline(radiusUm);
}

/**
 * Which drops share traced planes (one kernel task, one shapedRows call): a spheroid's at every radius, equilibrium
 * drops of one radius, or all of them when they are traced on shape nodes (neighbouring radii share nodes).
 */
export function shapeGroupKey(spec: ShapedRowSpec, radiusUm: number): string {
  if (spec.kind === "spheroid") return shapedRowKey(spec);
  return spec.deformationStep ? `${shapedRowKey(spec)}|nodes` : `${shapedRowKey(spec)}|${radiusUm}`;
}

/** The shapes (by the radius whose outline they are; a spheroid's: 0) a drop's row is made of, and their weights. */
function shapesOf(spec: ShapedRowSpec, radiusUm: number): { radiusUm: number; weight: number }[] {
  return spec.kind === "spheroid" ? [{ radiusUm: 0, weight: 1 }] : shapeNodeWeights(radiusUm, spec.deformationStep ?? 0);
}

/**
 * Refractive indices every plane is traced at, per shape and canting node; the sweep at a drop's own index is
 * interpolated from them (lib/rays/sweep-interpolation.ts). They are fixed for all requests, INDEX_NODES Chebyshev
 * nodes over the whole span of water's index the service's inputs can give (WATER_INDEX_RANGE), so that a row depends
 * only on its drop, plane and wavelength, never on which other wavelengths shared its task. Measured on one plane
 * (1 and 2 mm equilibrium drops, sun 10°, arc 0° and 45°, no canting, Θ 125–155° at 0.05°, 41 wavelengths 380–780 nm
 * at 15 °C) against tracing every wavelength: samples traced again per plane (of ~24,000) 2280, 653, 1963 with 5
 * nodes over this span, 838, 589, 1105 with 7, –, 580, 1029 with 8, and 604, –, 878 with 5 nodes over the task's
 * own span (the old way): 7 nodes cost about what 5 did over the wider span, with fewer samples the error estimate
 * distrusts. Worst bin 2e-2 of the peak, at a secondary bow's sharp edge, where the engine itself moves by 1–5e-2
 * when the pupil is sampled with 3990 instead of 4000 half-segments; in colour see BENCHMARKS.md, shape-index.
 */
export const INDEX_NODES = 7;
export const TRACED_INDICES: readonly number[] = chebyshevNodes(WATER_INDEX_RANGE.min, WATER_INDEX_RANGE.max, INDEX_NODES);

/**
 * Interpolated samples are checked (and traced at n where the check fails) unless every traced index sends their light
 * to one side of the grid, more than this beyond it. Θ at a fixed pupil point moves monotonically with n (each
 * refraction turns the ray further as n grows, Snell's law), so at an index between the nodes such a sample stays on
 * that side; past the outermost of 7 Chebyshev nodes (at cos(π/14) = 0.975 of the half-range, so 4.8e-4 in n beyond
 * it, 13 % of the 3.7e-3 to the next node) Θ moves on by about 13 % of the node-to-node shift, which was at most 3.4°
 * per 3e-3 of n near grazing (1 mm drops, 380–780 nm, measured): about 0.6°, inside 2°.
 */
const NEAR_MARGIN_DEG = 2;
const DEG = Math.PI / 180;

export interface ShapedDrop {
  radiusUm: number;
  /** Real refractive index at the drop's wavelength, and its size parameter 2πa/λ there. */
  mRe: number;
  x: number;
}

/**
 * The canting mean of |S1|², |S2|² for flattened drops (a spheroid's fixed axis ratio, or equilibrium drops, each its
 * own shape or blended from shape nodes: ShapedRowSpec.deformationStep) at any wavelengths, on bins of width stepDeg
 * centred on thetaDeg (ascending, uniform). Each scattering plane is traced once per shape and canting node at
 * TRACED_INDICES, the sweeps at the drops' own indices interpolated from those (spec.traceEveryIndex: traced at each
 * drop's index instead). Everything then scales with x (shapedPlaneRow), so drops of one shape and index share one context.
 */
export function shapedRows(spec: ShapedRowSpec, drops: readonly ShapedDrop[], thetaDeg: Float64Array, stepDeg: number): { perp: Float64Array; par: Float64Array }[] {
  const out = drops.map(() => ({ perp: new Float64Array(thetaDeg.length), par: new Float64Array(thetaDeg.length) }));
  if (drops.length === 0) return out;
  // Each drop's shapes and weights; then each shape is traced once, for every drop that uses it.
  const uses = drops.map((drop) => shapesOf(spec, drop.radiusUm));
  const shapes = [...new Set(uses.flatMap((u) => u.map((s) => s.radiusUm)))].sort((a, b) => a - b);
  const plane = bowScatteringPlane(spec.sunElevationDeg, spec.arcPositionDeg);
  const options = spec.rayOnly ? { rayOrders: [0, 1, 2, 3], bowOrders: [] } : {};
  // Samples whose light lands more than NEAR_MARGIN_DEG to one side of the grid at every traced index are never traced again.
  const near = { loRad: (thetaDeg[0] - stepDeg / 2 - NEAR_MARGIN_DEG) * DEG, hiRad: (thetaDeg[thetaDeg.length - 1] + stepDeg / 2 + NEAR_MARGIN_DEG) * DEG };
  const rowPerp = new Float64Array(thetaDeg.length);
  const rowPar = new Float64Array(thetaDeg.length);
  for (const shapeRadiusUm of shapes) {
    const outline = outlineFor(spec, shapeRadiusUm);
    const users = drops.flatMap((drop, d) => uses[d].filter((s) => s.radiusUm === shapeRadiusUm).map((s) => ({ drop, d, weight: s.weight })));
    const indices = [...new Set(users.map((u) => u.drop.mRe))].sort((a, b) => a - b);
    const interpolate = spec.traceEveryIndex !== true;
    const traced = interpolate ? TRACED_INDICES : indices;
    for (const node of cantingNodesFive(spec.cantingSdDeg)) {
      const axis = cantedAxis(node.tiltXDeg, node.tiltYDeg);
      // One canting node's sweeps at a time: memory stays at INDEX_NODES planes' sweeps (~14 MB), whatever the task.
      const sweeps = shapedPlaneSweeps(traced.map((n) => ({ outline, axis, n })), plane, 1, thetaDeg, stepDeg, options);
      for (const mRe of indices) {
        const tracer = interpolate ? shapedPlaneTracer({ outline, axis, n: mRe }, plane, options) : null;
        const at = interpolate
          ? sweeps[0].map((_, p) => (sweeps[0][p] ? interpolateSweep(sweeps.map((byOrder) => byOrder[p]!), traced, mRe, tracer!, near).sweep : null))
          : sweeps[traced.indexOf(mRe)];
        const ctx = contextFromSweeps(mRe, at, 1, thetaDeg, stepDeg, options);
        for (const { drop, d, weight } of users) {
          if (drop.mRe !== mRe) continue;
          shapedPlaneRow(ctx, drop.x, rowPerp, rowPar);
          const w = node.weight * weight;
          for (let j = 0; j < rowPerp.length; j++) {
            out[d].perp[j] += w * rowPerp[j];
            out[d].par[j] += w * rowPar[j];
          }
        }
      }
    }
  }
  return out;
}

/** One drop's row (shapedRows for a single drop), written into perp and par. */
export function shapedDropRow(
  spec: ShapedRowSpec,
  mRe: number,
  x: number,
  radiusUm: number,
  thetaDeg: Float64Array,
  stepDeg: number,
  perp: Float64Array,
  par: Float64Array,
): void {
  const [row] = shapedRows(spec, [{ radiusUm, mRe, x }], thetaDeg, stepDeg);
  perp.set(row.perp);
  par.set(row.par);
}
