import Color from "colorjs.io";
import type { OutputSpace } from "./output-spaces.js";

export type GamutMethod = "clip" | "css4" | "desaturate";

// Linear values this close outside the gamut count as inside: matrix round-off, not colour.
const GAMUT_TOLERANCE = 1e-9;

export function isInGamut(space: OutputSpace, r: number, g: number, b: number): boolean {
  const lo = space.gamutMin - GAMUT_TOLERANCE;
  const hi = space.gamutMax + GAMUT_TOLERANCE;
  return r >= lo && r <= hi && g >= lo && g <= hi && b >= lo && b <= hi;
}

function clamp(v: number, lo: number, hi: number): number {
  return v < lo ? lo : v > hi ? hi : v;
}

export function clipLinear(space: OutputSpace, rgb: [number, number, number]): [number, number, number] {
  return [clamp(rgb[0], space.gamutMin, space.gamutMax), clamp(rgb[1], space.gamutMin, space.gamutMax), clamp(rgb[2], space.gamutMin, space.gamutMax)];
}

/**
 * Mix towards the neutral (Y, Y, Y) of equal luminance Y until inside the gamut; the mix is done in linear
 * light, so Y is kept. The neutral's luminance must be that of the space's white at (1, 1, 1), true for the
 * spaces here (white Y = 1). A neutral itself outside the gamut (Y > max or Y < 0) is clipped.
 */
export function desaturateLinear(space: OutputSpace, rgb: [number, number, number], luminanceY: number): [number, number, number] {
  const lo = space.gamutMin;
  const hi = space.gamutMax;
  const n = clamp(luminanceY, lo, hi);
  let t = 0;
  for (const c of rgb) {
    if (c < lo && n > c) t = Math.max(t, (lo - c) / (n - c));
    else if (c > hi && n < c) t = Math.max(t, (c - hi) / (c - n));
  }
  t = Math.min(t, 1);
  return clipLinear(space, [rgb[0] + t * (n - rgb[0]), rgb[1] + t * (n - rgb[1]), rgb[2] + t * (n - rgb[2])]);
}

/** CSS Color 4 gamut mapping (chroma reduction in OKLCh with ΔEOK ≤ 0.02) as implemented by colorjs.io toGamut({ method: "css" }). */
export function css4MapLinear(space: OutputSpace, rgb: [number, number, number]): [number, number, number] {
  const target = space.encoded ? space.encodedColorjsId : space.linearColorjsId;
  const color = new Color(space.linearColorjsId, rgb).to(target);
  const mapped = color.toGamut({ method: "css", space: target }).to(space.linearColorjsId);
  return clipLinear(space, mapped.coords.map((v) => Number(v)) as [number, number, number]);
}
