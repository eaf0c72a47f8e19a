import { d65FromSunWhite, WHITE_ADAPTATION_METHOD } from "./adaptation.js";
import { type GamutMethod, clipLinear, css4MapLinear, desaturateLinear, isInGamut } from "./gamut.js";
import { type Matrix3, applyMatrix3 } from "./matrix3.js";
import { type OutputSpaceId, encodeLinear, outputSpace } from "./output-spaces.js";
import type { Xyz } from "./tristimulus.js";

export type WhiteHandling = "sun" | "absolute";

export interface RenderColourOptions {
  readonly space: OutputSpaceId;
  readonly gamut: GamutMethod;
  readonly white: WhiteHandling;
  /** XYZ of the sun's own light (any scale); required for white = "sun". */
  readonly sunWhite?: Xyz;
}

export interface RenderedColours {
  readonly space: OutputSpaceId;
  /** Interleaved triples: encoded for srgb, display-p3, rec2020; linear for the others. */
  readonly values: Float64Array;
  /** Interleaved linear-light triples after gamut mapping. */
  readonly linear: Float64Array;
  /** 1 where the sample lay outside the space's gamut before mapping. */
  readonly outOfGamut: Uint8Array;
  readonly whiteAdaptation: string;
  readonly spaceAdaptation: string;
}

/**
 * Interleaved XYZ (D65-referred under white = "absolute", or seen under the sun for white = "sun")
 * to an output space. Scale is kept: the caller normalises luminance (white Y = 1).
 */
export function renderXyz(xyz: Float64Array, options: RenderColourOptions): RenderedColours {
  if (xyz.length % 3 !== 0) throw new RangeError("XYZ array length must be a multiple of 3");
  const space = outputSpace(options.space);
  let d65FromInput: Matrix3 | null = null;
  // With no sunlight at all (the sun at the horizon behind a very turbid atmosphere) there is no white to
  // adapt to, and nothing lit to adapt: the colours stay as they are (all black).
  const sunless = options.white === "sun" && options.sunWhite !== undefined && !(options.sunWhite.Y > 0);
  if (options.white === "sun" && !sunless) {
    if (!options.sunWhite) throw new RangeError('white "sun" needs the sun\'s XYZ');
    d65FromInput = d65FromSunWhite(options.sunWhite);
  }
  const xyzD65 = d65FromInput ? applyMatrix3(d65FromInput, xyz) : xyz;
  const linearIn = applyMatrix3(space.linearFromXyzD65, xyzD65);
  const n = xyz.length / 3;
  const linear = new Float64Array(xyz.length);
  const values = new Float64Array(xyz.length);
  const outOfGamut = new Uint8Array(n);
  for (let s = 0; s < n; s++) {
    let rgb: [number, number, number] = [linearIn[3 * s], linearIn[3 * s + 1], linearIn[3 * s + 2]];
    if (!isInGamut(space, rgb[0], rgb[1], rgb[2])) {
      outOfGamut[s] = 1;
      if (options.gamut === "clip") rgb = clipLinear(space, rgb);
      else if (options.gamut === "desaturate") rgb = desaturateLinear(space, rgb, xyzD65[3 * s + 1]);
      else rgb = css4MapLinear(space, rgb);
    }
    linear.set(rgb, 3 * s);
    values.set(encodeLinear(space, rgb), 3 * s);
  }
  return {
    space: options.space,
    values,
    linear,
    outOfGamut,
    whiteAdaptation: sunless
      ? "none: no sunlight reaches the drops, so there is no white to adapt to"
      : options.white === "sun"
        ? WHITE_ADAPTATION_METHOD
        : "none (absolute: XYZ taken as D65-referred)",
    spaceAdaptation: space.adaptation,
  };
}

