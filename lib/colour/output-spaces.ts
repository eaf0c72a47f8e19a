import Color from "colorjs.io";
import { type Matrix3 } from "./matrix3.js";

export type OutputSpaceId = "xyz-d65" | "srgb-linear" | "srgb" | "display-p3" | "rec2020" | "acescg";

export const OUTPUT_SPACE_IDS: readonly OutputSpaceId[] = ["xyz-d65", "srgb-linear", "srgb", "display-p3", "rec2020", "acescg"];

export interface OutputSpace {
  readonly id: OutputSpaceId;
  /** colorjs.io id of the linear-light space holding the gamut. */
  readonly linearColorjsId: string;
  /** colorjs.io id of the encoded space (equal to linearColorjsId when the output is linear). */
  readonly encodedColorjsId: string;
  readonly encoded: boolean;
  /** Linear coordinates from colorjs.io XYZ-D65 (Y = 1 for the white), chromatic adaptation included. */
  readonly linearFromXyzD65: Matrix3;
  /** Inclusive bounds of each linear coordinate; Infinity where the space has no upper limit. */
  readonly gamutMin: number;
  readonly gamutMax: number;
  /** How XYZ-D65 is adapted to the space's white by colorjs.io. */
  readonly adaptation: string;
}

const definitions: Record<OutputSpaceId, Omit<OutputSpace, "linearFromXyzD65" | "id">> = {
  "xyz-d65": { linearColorjsId: "xyz-d65", encodedColorjsId: "xyz-d65", encoded: false, gamutMin: -Infinity, gamutMax: Infinity, adaptation: "none (D65)" },
  "srgb-linear": { linearColorjsId: "srgb-linear", encodedColorjsId: "srgb-linear", encoded: false, gamutMin: 0, gamutMax: 1, adaptation: "none (D65)" },
  srgb: { linearColorjsId: "srgb-linear", encodedColorjsId: "srgb", encoded: true, gamutMin: 0, gamutMax: 1, adaptation: "none (D65)" },
  "display-p3": { linearColorjsId: "p3-linear", encodedColorjsId: "p3", encoded: true, gamutMin: 0, gamutMax: 1, adaptation: "none (D65)" },
  rec2020: { linearColorjsId: "rec2020-linear", encodedColorjsId: "rec2020", encoded: true, gamutMin: 0, gamutMax: 1, adaptation: "none (D65)" },
  // ACEScg is scene-referred: colorjs.io gives it the range 0..65504 (half-float maximum).
  acescg: { linearColorjsId: "acescg", encodedColorjsId: "acescg", encoded: false, gamutMin: 0, gamutMax: 65504, adaptation: "Bradford, D65 → ACES white (0.32168, 0.33767), as colorjs.io applies it" },
};

/** The linear map colorjs.io applies, read off column by column from its conversion of unit XYZ vectors. */
function linearMatrixFromColorjs(colorjsId: string): Matrix3 {
  const cols = [0, 1, 2].map((j) => {
    const unit: [number, number, number] = [0, 0, 0];
    unit[j] = 1;
    return new Color("xyz-d65", unit).to(colorjsId).coords.map((v) => Number(v));
  });
  return [cols[0][0], cols[1][0], cols[2][0], cols[0][1], cols[1][1], cols[2][1], cols[0][2], cols[1][2], cols[2][2]];
}

const cache = new Map<OutputSpaceId, OutputSpace>();

export function outputSpace(id: OutputSpaceId): OutputSpace {
  let space = cache.get(id);
  if (!space) {
    const def = definitions[id];
    if (!def) throw new RangeError(`unknown output space ${String(id)}`);
    space = { id, ...def, linearFromXyzD65: linearMatrixFromColorjs(def.linearColorjsId) };
    cache.set(id, space);
  }
  return space;
}

/** Transfer function of the encoded space, taken from colorjs.io (sRGB and Display P3: IEC 61966-2-1; rec2020: colorjs.io's γ = 2.4). */
export function encodeLinear(space: OutputSpace, linear: [number, number, number]): [number, number, number] {
  if (!space.encoded) return linear;
  const s = Color.Space.get(space.encodedColorjsId);
  return s.fromBase!(linear) as [number, number, number];
}

export function decodeToLinear(space: OutputSpace, encoded: [number, number, number]): [number, number, number] {
  if (!space.encoded) return encoded;
  const s = Color.Space.get(space.encodedColorjsId);
  return s.toBase!(encoded) as [number, number, number];
}

/** colorjs.io's own XYZ of its D65 white (from x, y = 0.3127, 0.3290), Y = 1. */
export function colorjsD65White(): [number, number, number] {
  return [...Color.Space.get("srgb-linear").white] as [number, number, number];
}
