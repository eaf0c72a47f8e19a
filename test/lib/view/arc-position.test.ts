import { describe, expect, it } from "vitest";
import { arcPositionDeg } from "../../../lib/view/arc-position.js";
import { bowScatteringPlane } from "../../../lib/rays/bow-geometry.js";
import { directionFromAzimuthElevation } from "../../../lib/view/vectors.js";

const DEG = Math.PI / 180;

/**
 * The bow point at ψ and arc position α, built independently of arcPositionDeg from the scattering plane the
 * flattened-drop engine traces (lib/rays/bow-geometry.ts): the light leaving the drop is deflected towards e = −w(α),
 * so the observer sees it along cos ψ·d_in − sin ψ·e, in that file's observer frame (x towards the antisolar
 * azimuth, z up).
 */
function bowPoint(sunElevationDeg: number, psiDeg: number, alphaDeg: number): number[] {
  const { dIn, e } = bowScatteringPlane(sunElevationDeg, alphaDeg);
  const c = Math.cos(psiDeg * DEG);
  const s = Math.sin(psiDeg * DEG);
  return [0, 1, 2].map((k) => c * dIn[k] - s * e[k]);
}

describe("arc position of a view ray: the angle around the antisolar point from the bow's top (derivation: bow-geometry.ts's frame)", () => {
  it.each([0, 10, 10.5, 45, 89.5, 90, 120, 179, 180])("α = %f° round-trips at several sun elevations and ψ", (alpha) => {
    for (const sun of [0, 10, 35, 60]) {
      for (const psi of [5, 42, 51, 120]) {
        const d = bowPoint(sun, psi, alpha);
        const a = [Math.cos(sun * DEG), 0, -Math.sin(sun * DEG)];
        expect(arcPositionDeg(d, a)).toBeCloseTo(alpha, 9);
        // The mirror image across the vertical plane through the antisolar point has the same arc position.
        expect(arcPositionDeg([d[0], -d[1], d[2]], a)).toBeCloseTo(alpha, 9);
      }
    }
  });

  it("in the world frame: straight above the antisolar point is the top, level with it the side, below it the bottom", () => {
    // Sun at azimuth 240°, 12° up: the antisolar point lies at azimuth 60°, 12° down.
    const a = directionFromAzimuthElevation(60, -12);
    expect(arcPositionDeg(directionFromAzimuthElevation(60, 30), a)).toBeCloseTo(0, 9);
    expect(arcPositionDeg(directionFromAzimuthElevation(60, -60), a)).toBeCloseTo(180, 9);
    // Sun on the horizon: the horizon is the line level with the antisolar point.
    const level = directionFromAzimuthElevation(60, 0);
    expect(arcPositionDeg(directionFromAzimuthElevation(102, 0), level)).toBeCloseTo(90, 9);
    expect(arcPositionDeg(directionFromAzimuthElevation(18, 0), level)).toBeCloseTo(90, 9);
  });

  it("with the sun at the zenith every direction is as high as any other: the angle is still defined (from north)", () => {
    const a = [0, 0, -1];
    expect(arcPositionDeg(directionFromAzimuthElevation(0, -48), a)).toBeCloseTo(0, 9);
    expect(arcPositionDeg(directionFromAzimuthElevation(90, -48), a)).toBeCloseTo(90, 9);
  });
});
