// Chromaticities of an RGB space's primaries and white, read from colorjs.io rather than retyped.

import Color from "colorjs.io";
import { outputSpace, type OutputSpaceId } from "../colour/output-spaces.js";
import { chromaticity } from "../colour/tristimulus.js";

export interface XyPoint {
  x: number;
  y: number;
}

function xyOf(colorjsId: string, coords: [number, number, number]): XyPoint {
  const [X, Y, Z] = new Color(colorjsId, coords).to("xyz-d65").coords.map(Number);
  return chromaticity({ X, Y, Z });
}

/** Primaries and white of a D65 RGB space, as xy (spaces with another white would come back Bradford-adapted). */
export function rgbSpaceChromaticities(id: Extract<OutputSpaceId, "srgb" | "display-p3" | "rec2020">): { red: XyPoint; green: XyPoint; blue: XyPoint; white: XyPoint } {
  const linear = outputSpace(id).linearColorjsId;
  return {
    red: xyOf(linear, [1, 0, 0]),
    green: xyOf(linear, [0, 1, 0]),
    blue: xyOf(linear, [0, 0, 1]),
    white: xyOf(linear, [1, 1, 1]),
  };
}
