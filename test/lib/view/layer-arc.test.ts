import { describe, expect, it } from "vitest";
import { renderLayer, type ProfileColours } from "../../../lib/view/layer.js";
import type { RayField } from "../../../lib/view/ray-field.js";
import { ArcBlender, type ArcSlices } from "../../../lib/view/arc-slices.js";

const DEG = Math.PI / 180;
// Sun on the horizon in the south: the antisolar point lies north on the horizon (x east, y north, z up).
const antisolar: [number, number, number] = [0, 1, 0];

/** The direction at ψ from the antisolar point and arc position α (0 = straight up from it, 90 = level, east). */
function ray(psiDeg: number, alphaDeg: number): number[] {
  const c = Math.cos(psiDeg * DEG);
  const s = Math.sin(psiDeg * DEG);
  return [s * Math.sin(alphaDeg * DEG), c, s * Math.cos(alphaDeg * DEG)];
}

/** A flat profile whose tangential and radial parts have their own colours. */
function flat(perp: number[], par: number[]): ProfileColours {
  const count = 301;
  const p = new Float64Array(3 * count);
  const q = new Float64Array(3 * count);
  for (let i = 0; i < count; i++) {
    p.set(perp, 3 * i);
    q.set(par, 3 * i);
  }
  return { fromDeg: 30, stepDeg: 0.1, count, total: p.map((v, k) => v + q[k]), perpendicular: p, parallel: q };
}

describe("a layer of a bow that changes along the arc (lib/view/layer.ts with arc slices)", () => {
  const arc: ArcSlices = {
    nodesDeg: Float64Array.of(0, 10),
    slices: [flat([1, 0, 0], [0, 1, 0]), flat([0, 0, 1], [1, 1, 1])],
    bows: [
      { primaryDeg: null, secondaryDeg: null },
      { primaryDeg: null, secondaryDeg: null },
    ],
  };
  const pixels = [ray(42, 0), ray(42, 10), ray(42, 2.5), ray(42, 90)];
  const rays: RayField = {
    widthPx: pixels.length,
    heightPx: 1,
    ray: (x, _y, out) => {
      out.set(pixels[x]);
      return true;
    },
  };
  const render = (polariserTangentCos2?: number) =>
    renderLayer({ rays, antisolar, colours: arc.slices[0], ground: false, maxAngleDeg: 90, arc, polariserTangentCos2 }).data;

  it("each pixel blends the nodes about its own arc position (weights linear in arc position)", () => {
    const data = render();
    expect(Array.from(data.slice(0, 3))).toEqual([1, 1, 0]);
    expect(Array.from(data.slice(3, 6))).toEqual([1, 1, 2]);
    const blended = [0.75 * 1 + 0.25 * 1, 0.75 * 1 + 0.25 * 1, 0.25 * 2];
    Array.from(data.slice(6, 9)).forEach((v, k) => expect(v).toBeCloseTo(blended[k], 6));
    // Beyond the last node, the last node's bow.
    expect(Array.from(data.slice(9, 12))).toEqual([1, 1, 2]);
  });

  it("with a polariser each node's tangential and radial parts pass by Malus's law before the blend", () => {
    const c2 = 0.8;
    const data = render(c2);
    const node0 = [c2 * 1, (1 - c2) * 1, 0];
    const node1 = [(1 - c2) * 1, (1 - c2) * 1, c2 * 1 + (1 - c2) * 1];
    for (let k = 0; k < 3; k++) {
      expect(data[k]).toBeCloseTo(node0[k], 6);
      expect(data[3 + k]).toBeCloseTo(node1[k], 6);
      expect(data[6 + k]).toBeCloseTo(0.75 * node0[k] + 0.25 * node1[k], 6);
    }
    expect(new ArcBlender(arc).at(2.5, 42).w1).toBeCloseTo(0.25, 12);
  });
});
