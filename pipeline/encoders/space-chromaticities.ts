import Color from "colorjs.io";
import { outputSpace, type OutputSpaceId } from "../../lib/colour/output-spaces.js";
import type { ExrChromaticities } from "./exr.js";
import { chromaticity } from "../../lib/colour/tristimulus.js";

/** Published primaries and whites of the linear spaces that HDR files carry. */
const PUBLISHED: Partial<Record<OutputSpaceId, ExrChromaticities & { source: string }>> = {
  // ITU-R BT.709-6 part 1 (primaries and D65 white), shared by IEC 61966-2-1 (sRGB).
  "srgb-linear": { red: [0.64, 0.33], green: [0.3, 0.6], blue: [0.15, 0.06], white: [0.3127, 0.329], source: "ITU-R BT.709-6" },
  // Academy S-2014-004 (ACEScg, AP1) and TB-2018-001 (ACES white).
  acescg: { red: [0.713, 0.293], green: [0.165, 0.83], blue: [0.128, 0.044], white: [0.32168, 0.33767], source: "Academy S-2014-004, TB-2018-001" },
  // The X, Y, Z axes themselves; RGB = (1, 1, 1) is the equal-energy white (from the attribute's definition: the x, y of RGB (1,0,0), (0,1,0), (0,0,1), (1,1,1); OpenEXR ImfChromaticities.h).
  "xyz-d65": { red: [1, 0], green: [0, 1], blue: [0, 0], white: [1 / 3, 1 / 3], source: "CIE XYZ axes" },
};

/**
 * CIE 1931 x, y of a space's primaries and white, as OpenEXR's `chromaticities` and Radiance's PRIMARIES carry
 * them: the published values where we have them, else from colorjs.io's definition of the linear space (its
 * RGB → XYZ matrix columns, relative to the space's own white).
 */
export function spaceChromaticities(id: OutputSpaceId): ExrChromaticities & { source: string } {
  const published = PUBLISHED[id] ?? (id === "srgb" ? PUBLISHED["srgb-linear"] : undefined);
  if (published) return published;
  const space = Color.Space.get(outputSpace(id).linearColorjsId) as unknown as { M: { toXYZ: number[][] }; white: number[] };
  const xy = (X: number, Y: number, Z: number): [number, number] => {
    const c = chromaticity({ X, Y, Z });
    return [c.x, c.y];
  };
  const m = space.M.toXYZ;
  const column = (c: number) => xy(m[0][c], m[1][c], m[2][c]);
  return { red: column(0), green: column(1), blue: column(2), white: xy(space.white[0], space.white[1], space.white[2]), source: "colorjs.io space definition" };
}
