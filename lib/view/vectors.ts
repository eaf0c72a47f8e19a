// World frame of every view: x east, y north, z up (right-handed). Azimuth is measured clockwise from north
// (east = 90°), elevation upwards from the horizon.

export type Vec3 = [number, number, number];

export const RADIANS_PER_DEGREE = Math.PI / 180;

export function directionFromAzimuthElevation(azimuthDeg: number, elevationDeg: number): Vec3 {
  const az = azimuthDeg * RADIANS_PER_DEGREE;
  const el = elevationDeg * RADIANS_PER_DEGREE;
  return [Math.cos(el) * Math.sin(az), Math.cos(el) * Math.cos(az), Math.sin(el)];
}

/** Azimuth in [0°, 360°) and elevation of a direction (any length). */
export function azimuthElevationOf(d: ArrayLike<number>): { azimuthDeg: number; elevationDeg: number } {
  const horizontal = Math.hypot(d[0], d[1]);
  const azimuthDeg = (Math.atan2(d[0], d[1]) / RADIANS_PER_DEGREE + 360) % 360;
  return { azimuthDeg, elevationDeg: Math.atan2(d[2], horizontal) / RADIANS_PER_DEGREE };
}

export function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

export function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

export function normalise(a: Vec3): Vec3 {
  const n = Math.hypot(a[0], a[1], a[2]);
  return [a[0] / n, a[1] / n, a[2] / n];
}

/** Angle between two directions by atan2(|a×b|, a·b): accurate near 0° and 180°, where acos is not. */
export function angleBetweenDeg(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const c = cross(a, b);
  return Math.atan2(Math.hypot(c[0], c[1], c[2]), dot(a, b)) / RADIANS_PER_DEGREE;
}
