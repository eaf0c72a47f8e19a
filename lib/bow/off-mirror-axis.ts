// A flattened drop is never traced with its axis in the scattering plane. That plane is then a mirror plane of the
// drop: v = 0 is a root of Y(v) = d_out·N at every pupil sample u, and where ∂Y/∂v vanishes on it a pair of roots ±v*
// branches off (a pitchfork, Y odd in v). The sweeps follow the root they start on (v = 0) through the branch point,
// where 1/|∂Y/∂v| → ∞, and do not take the pair. Measured against brute force over the pupil (bench/in-plane-brute.ts,
// 2 mm equilibrium drops, sun 10°, 550 nm, the secondary's order, top of the bow; issue 13's notes): with the axis in
// the plane the sweeps put 1.6–3.1× the light the brute force finds, most of it in a spike (ψ 50–55°), and missed its
// peak (ψ 37–43°); with the axis turned 0.125° out of the plane about the sunlight they agree within 1–7 % and on
// the peak, and 0.25° out within 1–3 %. Up at the top and the foot of the bow (arc positions 0° and 180°) every
// node tilted only within the sun's vertical plane, the upright one included, has its axis in the plane.
//
// A drop turned about the sunlight's direction d_in by φ sends into a plane what the unturned drop sends into the
// plane turned by −φ about d_in, arc position α − φ (rotation invariance of the laws of reflection and refraction:
// common practice). So an axis closer to the plane than MIRROR_OFFSET_DEG, measured as an azimuth about d_in, is
// turned about d_in until it is MIRROR_OFFSET_DEG out: its row is the row MIRROR_OFFSET_DEG along the arc, which the
// cache already treats as the same place (shaped-rows.ts ARC_POSITION_STEP_DEG: one step). The physical light at
// the mirror plane itself is the limit from either side; a spike there carries no more light than it takes away
// from its neighbourhood.

import type { ScatteringPlane, Vec3 } from "../rays/plane-sweep.js";
import { cross, dot } from "../view/vectors.js";

const DEG = Math.PI / 180;

/** How far out of the scattering plane an axis is turned, as an azimuth about d_in: shaped-rows.ts ARC_POSITION_STEP_DEG. */
export const MIRROR_OFFSET_DEG = 0.125;

/**
 * The axis as traced: the same axis where its azimuth about d_in is at least MIRROR_OFFSET_DEG from the plane (on
 * either side: e or −e), else turned about d_in to MIRROR_OFFSET_DEG on the side of N it lies on (+N when in the plane).
 */
export function offMirrorAxis(axis: Readonly<Vec3>, plane: ScatteringPlane): Vec3 {
  const { dIn, e } = plane;
  const normal = cross(dIn, e);
  const along = dot(axis, dIn);
  // The axis's part across d_in, in the frame (e, N) of the plane ⟂ d_in.
  const ae = dot(axis, e);
  const an = dot(axis, normal);
  const across = Math.hypot(ae, an);
  const azimuth = Math.atan2(an, ae);
  // Distance of the azimuth from the plane's two directions, 0 and π.
  const fromPlane = Math.min(Math.abs(azimuth), Math.PI - Math.abs(azimuth));
  const offset = MIRROR_OFFSET_DEG * DEG;
  if (fromPlane >= offset || across === 0) return [axis[0], axis[1], axis[2]];
  const side = an < 0 ? -1 : 1;
  const turned = Math.abs(azimuth) <= Math.PI / 2 ? side * offset : side * (Math.PI - offset);
  const [c, s] = [Math.cos(turned) * across, Math.sin(turned) * across];
  const at = (k: number) => along * dIn[k] + c * e[k] + s * normal[k];
  return [at(0), at(1), at(2)];
}
