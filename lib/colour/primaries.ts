// The primaries and white of every output space, as CIE 1931 x, y: the one table the chromaticity figure,
// OpenEXR's `chromaticities` attribute and Radiance's PRIMARIES line read. The colour matrices themselves come
// from colorjs.io (output-spaces.ts); test/lib/colour/primaries.test.ts checks they agree with this table.

import type { OutputSpaceId } from "./output-spaces.js";

export type XyPair = readonly [x: number, y: number];

export interface SpacePrimaries {
  readonly red: XyPair;
  readonly green: XyPair;
  readonly blue: XyPair;
  readonly white: XyPair;
  /** The standard the values are from. */
  readonly source: string;
}

/** D65 as the RGB standards print it (ITU-R BT.709-6 Part 1, item 1.4). */
const D65: XyPair = [0.3127, 0.329];

const BT709: SpacePrimaries = { red: [0.64, 0.33], green: [0.3, 0.6], blue: [0.15, 0.06], white: D65, source: "ITU-R BT.709-6" };

const PRIMARIES: Record<OutputSpaceId, SpacePrimaries> = {
  // ITU-R BT.709-6 Part 1 (primaries and D65 white), shared by IEC 61966-2-1 (sRGB).
  "srgb-linear": BT709,
  srgb: BT709,
  // SMPTE EG 432-1:2010, the P3 primaries with the D65 white (Display P3).
  "display-p3": { red: [0.68, 0.32], green: [0.265, 0.69], blue: [0.15, 0.06], white: D65, source: "SMPTE EG 432-1:2010" },
  // ITU-R BT.2020-2, Table 3 (system colorimetry).
  rec2020: { red: [0.708, 0.292], green: [0.17, 0.797], blue: [0.131, 0.046], white: D65, source: "ITU-R BT.2020-2" },
  // Academy S-2014-004 (ACEScg, AP1) and TB-2018-001 (ACES white).
  acescg: { red: [0.713, 0.293], green: [0.165, 0.83], blue: [0.128, 0.044], white: [0.32168, 0.33767], source: "Academy S-2014-004, TB-2018-001" },
  // The X, Y, Z axes themselves; RGB = (1, 1, 1) is the equal-energy white (from the attribute's definition: the x, y of RGB (1,0,0), (0,1,0), (0,0,1), (1,1,1); OpenEXR ImfChromaticities.h).
  "xyz-d65": { red: [1, 0], green: [0, 1], blue: [0, 0], white: [1 / 3, 1 / 3], source: "CIE XYZ axes" },
};

/** CIE 1931 x, y of a space's primaries and white, with their source. */
export function spacePrimaries(id: OutputSpaceId): SpacePrimaries {
  return PRIMARIES[id];
}
