// |S1|², |S2|² of one flattened drop at one wavelength and one place on the bow, averaged over the drops'
// canting: the engine behind kernel rows for drops that are not spheres (lib/bow/kernel-rows.ts).

import { cantingNodesFive } from "../drops/shape/canting.js";
import { equilibriumOutline } from "../drops/shape/equilibrium-shape.js";
import { spheroidOutline, type DropOutline } from "../drops/shape/outline.js";
import { bowScatteringPlane, cantedAxis } from "../rays/bow-geometry.js";
import { shapedPlaneContext, shapedPlaneRow, type ShapedPlaneContext } from "./shaped-plane-rows.js";

/** Drops below this radius stay spheres under "equilibrium": see EQUILIBRIUM_NOTE. */
export const FLATTENED_FROM_RADIUS_UM = 150;
export const EQUILIBRIUM_NOTE =
  "below 150 µm radius 1 − axis ratio < 5e-4 (equilibrium shapes scaled as Pruppacher & Pitter 1971 measured), which moves the top of the bow by < 0.05° (measured on spheroids: about 1° per 0.01 of flattening): those drops are spheres";

/**
 * Sun elevation and arc position are rounded to these steps for the kernel rows and their cache keys. Measured
 * on 2 mm drops (axis ratio 0.93, sun 10°): the fold angles move by 0.22° per degree of arc position at arc 45°
 * (most) and by 0.24° per degree of sun elevation, so half a step moves them by at most 0.055° and 0.03°.
 */
export const SUN_ELEVATION_STEP_DEG = 0.25;
export const ARC_POSITION_STEP_DEG = 0.5;

export interface ShapedRowSpec {
  kind: "equilibrium" | "spheroid";
  /** Spheroids only: vertical over horizontal axis. */
  axisRatio?: number;
  cantingSdDeg: number;
  sunElevationDeg: number;
  arcPositionDeg: number;
  /** True: ray optics only (method "geometric"); false: Airy-type bows. */
  rayOnly: boolean;
}

export function quantiseSpec(spec: ShapedRowSpec): ShapedRowSpec {
  return {
    ...spec,
    sunElevationDeg: Math.round(spec.sunElevationDeg / SUN_ELEVATION_STEP_DEG) * SUN_ELEVATION_STEP_DEG,
    arcPositionDeg: Math.round(spec.arcPositionDeg / ARC_POSITION_STEP_DEG) * ARC_POSITION_STEP_DEG,
  };
}

/**
 * Version of the flattened-drop engine's numbers, in its rows' cache keys: raised when they change (2: bow pairs read
 * off the sweep, rows move by ≤ 2e-3 relative), so that only these rows are recomputed, not every kernel row.
 */
export const SHAPED_ENGINE_VERSION = 2;

/** The part of a kernel row's cache key that tells what shape and geometry it was computed for. */
export function shapedRowKey(spec: ShapedRowSpec): string {
  const shape = spec.kind === "spheroid" ? `q${spec.axisRatio}` : "eq";
  return `shape${SHAPED_ENGINE_VERSION}:${shape}:c${spec.cantingSdDeg}:s${spec.sunElevationDeg}:a${spec.arcPositionDeg}:${spec.rayOnly ? "rays" : "airy"}`;
}

/** A kernel row variant (rowVariant) with the shape of a drop that is not a sphere appended: its rows are other rows. */
export function shapedVariant(variant: string, shape: ShapedRowSpec | undefined): string {
  return shape ? `${variant}|${shapedRowKey(shape)}` : variant;
}

export function outlineFor(spec: Pick<ShapedRowSpec, "kind" | "axisRatio">, radiusUm: number): DropOutline {
  return spec.kind === "spheroid" ? spheroidOutline(spec.axisRatio!) : equilibriumOutline(radiusUm);
}

/**
 * Writes the canting mean of |S1|², |S2|² for a drop of equal-volume radius radiusUm and size parameter x, on
 * bins of width stepDeg centred on thetaDeg (ascending, uniform).
 */
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
  const contexts = cantingContexts(spec, mRe, radiusUm, thetaDeg, stepDeg);
  const rowPerp = new Float64Array(perp.length);
  const rowPar = new Float64Array(par.length);
  perp.fill(0);
  par.fill(0);
  for (const { weight, ctx } of contexts) {
    shapedPlaneRow(ctx, x, rowPerp, rowPar);
    for (let j = 0; j < perp.length; j++) {
      perp[j] += weight * rowPerp[j];
      par[j] += weight * rowPar[j];
    }
  }
}

/**
 * The last canting nodes' contexts: everything in them scales with x, so drops of one shape (a spheroid's fixed axis
 * ratio, at every radius of a kernel task: one wavelength, one grid) share them. Equilibrium shapes change with the
 * radius, which is then part of the key.
 */
let lastContexts: { key: string; contexts: { weight: number; ctx: ShapedPlaneContext }[] } | null = null;

function cantingContexts(spec: ShapedRowSpec, mRe: number, radiusUm: number, thetaDeg: Float64Array, stepDeg: number) {
  const shape = spec.kind === "spheroid" ? `q${spec.axisRatio}` : `eq${radiusUm}`;
  const key = `${shapedRowKey(spec)}|${shape}|${mRe}|${thetaDeg[0]}|${thetaDeg.length}|${stepDeg}`;
  if (lastContexts?.key === key) return lastContexts.contexts;
  const outline = outlineFor(spec, radiusUm);
  const plane = bowScatteringPlane(spec.sunElevationDeg, spec.arcPositionDeg);
  const options = spec.rayOnly ? { rayOrders: [0, 1, 2, 3], bowOrders: [] } : {};
  const contexts = cantingNodesFive(spec.cantingSdDeg).map((node) => ({
    weight: node.weight,
    ctx: shapedPlaneContext({ outline, axis: cantedAxis(node.tiltXDeg, node.tiltYDeg), n: mRe }, plane, 1, thetaDeg, stepDeg, options),
  }));
  lastContexts = { key, contexts };
  return contexts;
}
