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

/** cos and sin of the angle at each pixel centre of a row or column, computed once per map. */
function trigAtCentres(count: number, angleDegAt: (centrePx: number) => number): { cos: Float64Array; sin: Float64Array } {
  const cos = new Float64Array(count);
  const sin = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    const rad = angleDegAt(i + 0.5) * RADIANS_PER_DEGREE;
    cos[i] = Math.cos(rad);
    sin[i] = Math.sin(rad);
  }
  return { cos, sin };
}

export function skyRayField(widthPx: number, heightPx: number): RayField {
  const { cos: cosEl, sin: sinEl } = trigAtCentres(heightPx, (y) => skyElevationDeg(y, heightPx));
  const { cos: cosAz, sin: sinAz } = trigAtCentres(widthPx, (x) => skyAzimuthDeg(x, widthPx));
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
