import { adapt as colorjsAdapt } from "colorjs.io/src/CATs.js";
import { type Matrix3, fromRows } from "./matrix3.js";
import { colorjsD65White } from "./output-spaces.js";
import type { Xyz } from "./tristimulus.js";

export const WHITE_ADAPTATION_METHOD = "Bradford (linear, von Kries-type scaling in Bradford cone space), via colorjs.io";

/**
 * XYZ-D65 from XYZ seen under the sun: Bradford transform (Lam 1985; as defined in colorjs.io CATs)
 * taking the sun's white to colorjs.io's D65 white, so the sun renders as the output space's white.
 */
export function d65FromSunWhite(sunWhite: Xyz): Matrix3 {
  if (!(sunWhite.Y > 0)) throw new RangeError("sun white must have positive luminance");
  const w1: [number, number, number] = [sunWhite.X / sunWhite.Y, 1, sunWhite.Z / sunWhite.Y];
  return fromRows(colorjsAdapt(w1, colorjsD65White(), "Bradford"));
}
