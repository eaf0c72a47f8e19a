// Pinhole cameras: rectilinear (gnomonic, r = f·tan θ) and equidistant fisheye (r = f·θ), with θ the angle of a
// ray from the optical axis and r its distance from the image centre in pixels. Square pixels, principal point at
// the image centre, image y growing downwards.

import { type Vec3, RADIANS_PER_DEGREE, cross, directionFromAzimuthElevation } from "./vectors.js";
import type { RayField } from "./ray-field.js";

export type Projection = "rectilinear" | "fisheye";

export interface Camera {
  projection: Projection;
  widthPx: number;
  heightPx: number;
  focalPx: number;
  /** Azimuth of the optical axis, clockwise from north. */
  yawDeg: number;
  /** Elevation of the optical axis, up positive. */
  pitchDeg: number;
  /** Turn of the camera about its axis; positive turns it clockwise as the photographer sees it. */
  rollDeg: number;
}

export interface CameraBasis {
  forward: Vec3;
  /** Image +x (rightwards) and image up (−y), as world directions. */
  right: Vec3;
  up: Vec3;
}

/** Focal length in pixels from the horizontal field of view across the full width. */
export function focalPxFromFov(projection: Projection, widthPx: number, horizontalFovDeg: number): number {
  const half = (horizontalFovDeg / 2) * RADIANS_PER_DEGREE;
  return projection === "rectilinear" ? widthPx / 2 / Math.tan(half) : widthPx / 2 / half;
}

/** Similar triangles: f_px / width_px = f_mm / sensor width_mm. */
export function focalPxFromLens(focalLengthMm: number, sensorWidthMm: number, widthPx: number): number {
  return (focalLengthMm / sensorWidthMm) * widthPx;
}

/** Full field of view across an extent of `extentPx` pixels through the centre. */
export function fieldOfViewDeg(projection: Projection, focalPx: number, extentPx: number): number {
  const r = extentPx / 2;
  return (2 * (projection === "rectilinear" ? Math.atan(r / focalPx) : r / focalPx)) / RADIANS_PER_DEGREE;
}

/** Angular size of one pixel at the image centre, degrees (the same for both projections there). */
export function centralPixelDeg(focalPx: number): number {
  return Math.atan(1 / focalPx) / RADIANS_PER_DEGREE;
}

export function cameraBasis(camera: Pick<Camera, "yawDeg" | "pitchDeg" | "rollDeg">): CameraBasis {
  const forward = directionFromAzimuthElevation(camera.yawDeg, camera.pitchDeg);
  const yaw = camera.yawDeg * RADIANS_PER_DEGREE;
  // Level right-hand direction: east when looking north, south when looking east.
  const levelRight: Vec3 = [Math.cos(yaw), -Math.sin(yaw), 0];
  const levelUp = cross(levelRight, forward);
  const c = Math.cos(camera.rollDeg * RADIANS_PER_DEGREE);
  const s = Math.sin(camera.rollDeg * RADIANS_PER_DEGREE);
  const right: Vec3 = [0, 1, 2].map((k) => c * levelRight[k] - s * levelUp[k]) as Vec3;
  const up: Vec3 = [0, 1, 2].map((k) => s * levelRight[k] + c * levelUp[k]) as Vec3;
  return { forward, right, up };
}

/**
 * Unit ray through image point (xPx, yPx) (pixel i's centre is at i + 0.5) written into out; false where the
 * point has no ray (a fisheye beyond θ = 180°).
 */
export function rayThrough(camera: Camera, basis: CameraBasis, xPx: number, yPx: number, out: Float64Array): boolean {
  const u = xPx - camera.widthPx / 2;
  const v = camera.heightPx / 2 - yPx;
  const { forward: f, right: r, up: w } = basis;
  let a: number;
  let b: number;
  let c: number;
  if (camera.projection === "rectilinear") {
    a = camera.focalPx;
    b = u;
    c = v;
  } else {
    const radius = Math.hypot(u, v);
    const theta = radius / camera.focalPx;
    if (theta > Math.PI) return false;
    const s = radius > 0 ? Math.sin(theta) / radius : 0;
    a = Math.cos(theta);
    b = s * u;
    c = s * v;
  }
  const x = a * f[0] + b * r[0] + c * w[0];
  const y = a * f[1] + b * r[1] + c * w[1];
  const z = a * f[2] + b * r[2] + c * w[2];
  // Not Math.hypot, several times slower in V8: the sum of squares of a ray this size cannot overflow.
  const n = Math.sqrt(x * x + y * y + z * z);
  out[0] = x / n;
  out[1] = y / n;
  out[2] = z / n;
  return true;
}

/** Image point of a world direction, or null when the camera cannot see it. Inverse of rayThrough. */
export function projectDirection(camera: Camera, basis: CameraBasis, d: ArrayLike<number>): { xPx: number; yPx: number } | null {
  const a = d[0] * basis.forward[0] + d[1] * basis.forward[1] + d[2] * basis.forward[2];
  const b = d[0] * basis.right[0] + d[1] * basis.right[1] + d[2] * basis.right[2];
  const c = d[0] * basis.up[0] + d[1] * basis.up[1] + d[2] * basis.up[2];
  let u: number;
  let v: number;
  if (camera.projection === "rectilinear") {
    if (a <= 0) return null;
    u = (camera.focalPx * b) / a;
    v = (camera.focalPx * c) / a;
  } else {
    const sinTheta = Math.hypot(b, c);
    const theta = Math.atan2(sinTheta, a);
    const scale = sinTheta > 0 ? (camera.focalPx * theta) / sinTheta : 0;
    u = scale * b;
    v = scale * c;
  }
  return { xPx: camera.widthPx / 2 + u, yPx: camera.heightPx / 2 - v };
}

export function cameraRayField(camera: Camera): RayField {
  const basis = cameraBasis(camera);
  return {
    widthPx: camera.widthPx,
    heightPx: camera.heightPx,
    ray: (x, y, out) => rayThrough(camera, basis, x + 0.5, y + 0.5, out),
  };
}
