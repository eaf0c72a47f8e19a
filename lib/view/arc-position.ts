// Where along the bow a view ray lies: the angle around the antisolar point from the bow's highest point (0°),
// through its side level with the antisolar point (90°), to its lowest point (180°). Left and right of the
// vertical through the antisolar point are alike (drops canted evenly both ways), so the angle runs 0–180°.
// The same frame as lib/rays/bow-geometry.ts: the bow point at ψ and arc position α is seen along
// cos ψ·a + sin ψ·(cos α·t̂ + sin α·ŷ), t̂ the upward unit vector square to the antisolar direction a (vector
// algebra, common practice).

import { RADIANS_PER_DEGREE } from "./vectors.js";

/** The bow's upward and sideways unit directions t̂ and ŝ square to an antisolar direction: one per image. */
export interface ArcFrame {
  up: [number, number, number];
  side: [number, number, number];
}

/**
 * The frame of arc positions about the unit antisolar direction a. With the sun at the zenith every direction square
 * to a is as high as any other: the angle is then measured from north (+y).
 */
export function arcFrame(a: ArrayLike<number>): ArcFrame {
  // t̂ = the world's up (0, 0, 1) less its part along a, normalised.
  let tx = -a[2] * a[0];
  let ty = -a[2] * a[1];
  let tz = 1 - a[2] * a[2];
  let tn = Math.hypot(tx, ty, tz);
  if (tn < 1e-12) {
    tx = -a[1] * a[0];
    ty = 1 - a[1] * a[1];
    tz = -a[1] * a[2];
    tn = Math.hypot(tx, ty, tz);
  }
  tx /= tn;
  ty /= tn;
  tz /= tn;
  // The side direction ŝ = a × t̂ (horizontal).
  return { up: [tx, ty, tz], side: [a[1] * tz - a[2] * ty, a[2] * tx - a[0] * tz, a[0] * ty - a[1] * tx] };
}

/** Arc position of unit ray d in a frame from arcFrame, degrees in [0, 180]. */
export function arcPositionInFrame(d: ArrayLike<number>, frame: ArcFrame): number {
  const { up: t, side: s } = frame;
  const up = d[0] * t[0] + d[1] * t[1] + d[2] * t[2];
  const side = d[0] * s[0] + d[1] * s[1] + d[2] * s[2];
  return Math.atan2(Math.abs(side), up) / RADIANS_PER_DEGREE;
}

/** Arc position of unit ray d about the unit antisolar direction a, degrees in [0, 180] (arcFrame, arcPositionInFrame). */
export function arcPositionDeg(d: ArrayLike<number>, a: ArrayLike<number>): number {
  return arcPositionInFrame(d, arcFrame(a));
}
