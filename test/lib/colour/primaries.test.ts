import { describe, expect, it } from "vitest";
import Color from "colorjs.io";
import { spacePrimaries } from "../../../lib/colour/primaries.js";
import { outputSpace } from "../../../lib/colour/output-spaces.js";

const xy = (X: number, Y: number, Z: number) => [X / (X + Y + Z), Y / (X + Y + Z)];

describe("one table of primaries and whites", () => {
  // colorjs.io (a general-purpose colour library) builds the RGB → XYZ matrices our colour conversions use from
  // these standards' primaries and whites; its matrix columns, read back as x, y, must be the table's values.
  // 1e-12: double-precision rounding of its matrices (seen: ≤ 1.2e-16).
  it.each(["srgb-linear", "srgb", "display-p3", "rec2020", "acescg"] as const)("%s: the table agrees with colorjs.io's matrix to 1e-12", (id) => {
    const space = Color.Space.get(outputSpace(id).linearColorjsId) as unknown as { M: { toXYZ: number[][] }; white: number[] };
    const m = space.M.toXYZ;
    const p = spacePrimaries(id);
    const expected = [p.red, p.green, p.blue, p.white];
    const got = [xy(m[0][0], m[1][0], m[2][0]), xy(m[0][1], m[1][1], m[2][1]), xy(m[0][2], m[1][2], m[2][2]), xy(space.white[0], space.white[1], space.white[2])];
    got.forEach((g, i) => {
      expect(Math.abs(g[0] - expected[i][0])).toBeLessThanOrEqual(1e-12);
      expect(Math.abs(g[1] - expected[i][1])).toBeLessThanOrEqual(1e-12);
    });
  });

  it("sRGB and linear sRGB share BT.709's primaries and D65 (IEC 61966-2-1:1999 adopts them)", () => {
    expect(spacePrimaries("srgb")).toEqual(spacePrimaries("srgb-linear"));
    expect(spacePrimaries("srgb").white).toEqual([0.3127, 0.329]);
  });

  it("XYZ: the axes themselves, with the equal-energy white (OpenEXR's chromaticities of an XYZ file)", () => {
    const p = spacePrimaries("xyz-d65");
    expect([p.red, p.green, p.blue, p.white]).toEqual([[1, 0], [0, 1], [0, 0], [1 / 3, 1 / 3]]);
  });
});
