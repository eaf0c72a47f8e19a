import { describe, expect, it } from "vitest";
import { ArcBlender, type ArcSlices } from "../../../lib/view/arc-slices.js";
import type { ProfileColours } from "../../../lib/view/layer.js";

const FROM = 30;
const STEP = 0.01;
const COUNT = 3001;

/** A synthetic profile: Gaussian bows of width sdDeg at primaryDeg and secondaryDeg (grey, every channel alike). */
function profile(primaryDeg: number, secondaryDeg: number, sdDeg = 0.2, height = 1): ProfileColours {
  const total = new Float64Array(3 * COUNT);
  for (let i = 0; i < COUNT; i++) {
    const psi = FROM + i * STEP;
    const y = height * (Math.exp(-(((psi - primaryDeg) / sdDeg) ** 2) / 2) + 0.4 * Math.exp(-(((psi - secondaryDeg) / sdDeg) ** 2) / 2));
    total.fill(y, 3 * i, 3 * i + 3);
  }
  return { fromDeg: FROM, stepDeg: STEP, count: COUNT, total, perpendicular: total, parallel: total };
}

function value(c: ProfileColours, psi: number): number {
  const t = (psi - c.fromDeg) / c.stepDeg;
  const i = Math.min(Math.floor(t), c.count - 2);
  return c.total[3 * i] * (1 - (t - i)) + c.total[3 * (i + 1)] * (t - i);
}

function blended(b: ArcBlender, alpha: number, psi: number): number {
  const s = b.at(alpha, psi);
  return s.w0 * value(b.arc.slices[s.k0], s.psi0Deg) + s.w1 * value(b.arc.slices[s.k1], s.psi1Deg);
}

function peakOf(f: (psi: number) => number, lo: number, hi: number): { at: number; height: number } {
  let at = lo;
  for (let psi = lo; psi <= hi; psi += 0.001) if (f(psi) > f(at)) at = psi;
  return { at, height: f(at) };
}

// Two nodes whose bows lie 2° apart (the primary of 2 mm drops moves that much over 10° of arc near the top: lib/bow/shaped-rows.ts).
const arc: ArcSlices = {
  nodesDeg: Float64Array.of(0, 10),
  slices: [profile(40, 52), profile(42, 51)],
  bows: [
    { primaryDeg: 40, secondaryDeg: 52 },
    { primaryDeg: 42, secondaryDeg: 51 },
  ],
};

describe("blending bows between arc nodes (displacement interpolation, lib/view/arc-slices.ts)", () => {
  it("at a node the blend is that node's profile, unwarped", () => {
    const b = new ArcBlender(arc);
    for (const psi of [31, 40, 41.3, 52, 59]) {
      expect(blended(b, 0, psi)).toBeCloseTo(value(arc.slices[0], psi), 12);
      expect(blended(b, 10, psi)).toBeCloseTo(value(arc.slices[1], psi), 12);
    }
  });

  it("half-way a moving bow stays one bow: its peak half-way between the nodes' peaks, at full height", () => {
    const b = new ArcBlender(arc);
    const primary = peakOf((psi) => blended(b, 5, psi), 38, 45);
    const secondary = peakOf((psi) => blended(b, 5, psi), 49, 54);
    expect(primary.at).toBeCloseTo(41, 1);
    expect(secondary.at).toBeCloseTo(51.5, 1);
    // The warp stretches the bow by (41 − 30)/(40 − 30) at most: the peak's height is kept (linear interpolation of samples 0.01° apart).
    expect(primary.height).toBeGreaterThan(0.99);
    // A plain blend would draw two half-height bows instead (the check fails without the alignment).
    const plain = new ArcBlender({ ...arc, bows: arc.bows.map(() => ({ primaryDeg: null, secondaryDeg: null })) });
    expect(peakOf((psi) => blended(plain, 5, psi), 38, 45).height).toBeLessThan(0.6);
  });

  it("peaks further apart than MAX_ALIGNED_SHIFT_DEG are taken for different features and blended plainly", () => {
    const far: ArcSlices = { ...arc, slices: [profile(35, 52), profile(42, 51)], bows: [{ primaryDeg: 35, secondaryDeg: null }, { primaryDeg: 42, secondaryDeg: null }] };
    const b = new ArcBlender(far);
    const s = b.at(5, 38);
    expect(s.psi0Deg).toBe(38);
    expect(s.psi1Deg).toBe(38);
    expect(s.w0).toBeCloseTo(0.5, 12);
  });

  it("outside the nodes the nearest node holds; one node serves every arc position", () => {
    const b = new ArcBlender({ ...arc, nodesDeg: Float64Array.of(20, 30) });
    expect(b.at(5, 40)).toMatchObject({ k0: 0, w0: 1, w1: 0, psi0Deg: 40 });
    expect(b.at(90, 40)).toMatchObject({ k1: 1, w0: 0, w1: 1, psi1Deg: 40 });
    const one = new ArcBlender({ nodesDeg: Float64Array.of(90), slices: [arc.slices[0]], bows: [arc.bows[0]] });
    expect(one.at(0, 41)).toMatchObject({ k0: 0, k1: 0, w0: 1, w1: 0, psi0Deg: 41 });
  });
});
