// Equirectangular (latitude–longitude) sky map: longitude = azimuth, latitude = elevation, both linear in pixels.
// Column centre u = (x + ½)/width maps to azimuth 360°·u − 180°: north in the middle column, east at ¾ width,
// south at both edges; rows run from the zenith (top) to the nadir (bottom). Seen from inside the sphere, as a
// panorama is, east lies right of north.

import { RADIANS_PER_DEGREE } from "./vectors.js";
import type { RayField } from "./ray-field.js";

export function skyAzimuthDeg(xPx: number, widthPx: number): number {
  return (360 * xPx) / widthPx - 180;
}

export function skyElevationDeg(yPx: number, heightPx: number): number {
  return 90 - (180 * yPx) / heightPx;
}

/** Continuous pixel coordinates of a direction given by azimuth (any turn) and elevation. */
export function skyPixelOf(azimuthDeg: number, elevationDeg: number, widthPx: number, heightPx: number): { xPx: number; yPx: number } {
  const wrapped = ((((azimuthDeg + 180) % 360) + 360) % 360) - 180;
  return { xPx: ((wrapped + 180) / 360) * widthPx, yPx: ((90 - elevationDeg) / 180) * heightPx };
}

export function skyRayField(widthPx: number, heightPx: number): RayField {
  const cosEl = new Float64Array(heightPx);
  const sinEl = new Float64Array(heightPx);
  for (let y = 0; y < heightPx; y++) {
    const el = skyElevationDeg(y + 0.5, heightPx) * RADIANS_PER_DEGREE;
    cosEl[y] = Math.cos(el);
    sinEl[y] = Math.sin(el);
  }
  const sinAz = new Float64Array(widthPx);
  const cosAz = new Float64Array(widthPx);
  for (let x = 0; x < widthPx; x++) {
    const az = skyAzimuthDeg(x + 0.5, widthPx) * RADIANS_PER_DEGREE;
    sinAz[x] = Math.sin(az);
    cosAz[x] = Math.cos(az);
  }
  return {
    widthPx,
    heightPx,
    ray: (x, y, out) => {
      out[0] = cosEl[y] * sinAz[x];
      out[1] = cosEl[y] * cosAz[x];
      out[2] = sinEl[y];
      return true;
    },
  };
}
