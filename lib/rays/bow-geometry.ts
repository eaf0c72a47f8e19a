// Where a point of the bow lies relative to a falling drop. Observer frame: x̂ horizontal towards the antisolar
// azimuth, ŷ horizontal, ẑ up. Sunlight travels along d_in = (cos h, 0, −sin h) for a sun at elevation h, so the
// antisolar point lies along d_in. The bow point at angle ψ from the antisolar point and arc position α (0 at the
// bow's highest point, 90° level with the antisolar point, 180° at its lowest) is seen along
// cos ψ·d_in + sin ψ·w(α), w(α) = cos α·t̂ + sin α·ŷ, t̂ the upward unit vector ⟂ d_in. The light reaching the eye
// travels the other way, at scattering angle Θ = 180° − ψ deflected towards −w(α): that half-plane is the one
// traced (lib/rays/plane-sweep.ts, e = −w). Vector algebra of the geometry (common practice).

import type { ScatteringPlane, Vec3 } from "./plane-sweep.js";

const DEG = Math.PI / 180;

export function bowScatteringPlane(sunElevationDeg: number, arcPositionDeg: number): ScatteringPlane {
  const h = sunElevationDeg * DEG;
  const a = arcPositionDeg * DEG;
  const dIn: Vec3 = [Math.cos(h), 0, -Math.sin(h)];
  const up: Vec3 = [Math.sin(h), 0, Math.cos(h)];
  return { dIn, e: [-Math.cos(a) * up[0], -Math.sin(a), -Math.cos(a) * up[2]] };
}

/** The drop's symmetry axis (up) tilted by canting angles tiltXDeg (in the x–z plane) and tiltYDeg (y–z). */
export function cantedAxis(tiltXDeg: number, tiltYDeg: number): Vec3 {
  const tx = Math.tan(tiltXDeg * DEG);
  const ty = Math.tan(tiltYDeg * DEG);
  const len = Math.sqrt(1 + tx * tx + ty * ty);
  return [tx / len, ty / len, 1 / len];
}
