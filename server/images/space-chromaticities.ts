import Color from "colorjs.io";
import { outputSpace, type OutputSpaceId } from "../../lib/colour/output-spaces.js";
import type { ExrChromaticities } from "./exr.js";

/**
 * CIE 1931 x, y of a space's primaries and white, from colorjs.io's native definition of the linear space
 * (its RGB → XYZ matrix columns, relative to the space's own white): what OpenEXR's `chromaticities` and
 * Radiance's PRIMARIES carry.
 */
export function spaceChromaticities(id: OutputSpaceId): ExrChromaticities {
  const space = Color.Space.get(outputSpace(id).linearColorjsId) as unknown as { M?: { toXYZ: number[][] }; white: number[] };
  const xy = (X: number, Y: number, Z: number): [number, number] => [X / (X + Y + Z), Y / (X + Y + Z)];
  const white = xy(space.white[0], space.white[1], space.white[2]);
  if (!space.M) {
    // XYZ itself: the primaries are the X, Y, Z axes.
    return { red: [1, 0], green: [0, 1], blue: [0, 0], white };
  }
  const m = space.M.toXYZ;
  const column = (c: number) => xy(m[0][c], m[1][c], m[2][c]);
  return { red: column(0), green: column(1), blue: column(2), white };
}
