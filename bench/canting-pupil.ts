// The canting mean of a flattened drop's bow by brute force over the pupil, with no scattering plane traced: a reference
// for lib/bow/canting-spread.ts that no sweep enters. A drop is symmetric about its axis, so a drop whose axis a is tilted
// scatters as the upright drop turned by the rotation that takes ẑ to a: seen with the sun at elevation h at arc
// position A, it sends the light the upright drop sends with the sun at h′ (sin h′ = a·(−d_in)) to arc position A − δ,
// δ the azimuth of a about d_in from the vertical (a rotation keeps Θ and the scattering plane, so |S1|², |S2|² too:
// common practice). The tilts' Gaussian (σ in each of two vertical planes, Huang, Bringi & Thurai 2008) becomes a
// density p(h′, δ) (times the Jacobian of the change of variables), and the canting mean at (Θ, A) is
// ∫∫ p(h′, δ)·I(Θ, A − δ; h′) dh′ dδ: for each h′ on a grid, every ray of a square grid over the upright drop's pupil
// (power × du·dv) is binned by Θ with weight p(h′, A − α), α where it leaves. Ray optics, orders 0–3, unpolarised
// sun; power per unit solid angle (sky-brute.ts), the units of the engine's rows over x².

import { shapedPlaneTracer } from "../lib/bow/shaped-plane-rows.js";
import type { DropOutline } from "../lib/drops/shape/outline.js";
import { bowScatteringPlane } from "../lib/rays/bow-geometry.js";
import { AT, ORDER_STRIDE } from "../lib/rays/shape-tracer.js";
import { tracedPower } from "./in-plane-brute.js";
import { tiltDensity } from "../lib/drops/shape/tilt-density.js";

const DEG = Math.PI / 180;

export interface PupilCantingGrid {
  /** Pupil step, units of the drop's equivalent radius. */
  du: number;
  /** Step of the sun's elevation relative to the drop's axis, degrees. */
  elevationStepDeg: number;
  /** Elevations over ±spanSd·σ about the sun's own. */
  spanSd: number;
}

/**
 * Canting mean of orders 0–3 (⟂ + ∥ summed) on bins of stepDeg from fromDeg (count bins, Θ ascending), per unit solid
 * angle, for drops of this outline and index with the sun at sunElevationDeg, at arc position arcPositionDeg.
 */
export function pupilCantingRow(
  outline: DropOutline,
  n: number,
  sunElevationDeg: number,
  arcPositionDeg: number,
  sdDeg: number,
  fromDeg: number,
  stepDeg: number,
  count: number,
  grid: PupilCantingGrid,
): Float64Array {
  const out = new Float64Array(count);
  const orders = [0, 1, 2, 3];
  const reach = outline.maxRadius * 1.001;
  const m = Math.round((grid.spanSd * sdDeg) / grid.elevationStepDeg);
  for (let k = -m; k <= m; k++) {
    const elevationDeg = sunElevationDeg + k * grid.elevationStepDeg;
    // The plane only sets the pupil's frame: rays at u·e + v·N, launched along d_in.
    const tracer = shapedPlaneTracer({ outline, axis: [0, 0, 1], n }, bowScatteringPlane(elevationDeg, 90), { rayOrders: [0, 1], bowOrders: [2, 3] });
    const h = elevationDeg * DEG;
    const dIn = [Math.cos(h), 0, -Math.sin(h)];
    const up = [Math.sin(h), 0, Math.cos(h)];
    for (let u = -reach + grid.du / 2; u < reach; u += grid.du) {
      for (let v = -reach + grid.du / 2; v < reach; v += grid.du) {
        if (u * u + v * v > reach * reach) continue;
        tracer.traceAt(u, v, 3);
        const rec = tracer.lastTrace.orders;
        for (const p of orders) {
          const base = p * ORDER_STRIDE;
          if (rec[base + AT.valid] !== 1) continue;
          const [dx, dy, dz] = [rec[base + AT.dir], rec[base + AT.dir + 1], rec[base + AT.dir + 2]];
          const thetaDeg = Math.acos(Math.max(-1, Math.min(1, dx * dIn[0] + dy * dIn[1] + dz * dIn[2]))) / DEG;
          const j = Math.floor((thetaDeg - fromDeg) / stepDeg);
          if (j < 0 || j >= count) continue;
          // The observer looks back along the ray, s = −d_out; α = atan2(s·ŷ, s·t̂) (bow-geometry.ts's w(α)).
          const alphaDeg = Math.atan2(-dy, -(dx * up[0] + dz * up[2])) / DEG;
          const azimuthDeg = ((((arcPositionDeg - alphaDeg + 180) % 360) + 360) % 360) - 180;
          const density = tiltDensity(sunElevationDeg, sdDeg, elevationDeg, azimuthDeg);
          if (density === 0) continue;
          // power·du² · p (per rad²) · Δh′ (rad) over the bin's Θ width (rad); over sin Θ below.
          out[j] += (tracedPower(rec, base) * grid.du * grid.du * density * grid.elevationStepDeg) / (DEG * stepDeg * DEG);
        }
      }
    }
  }
  for (let j = 0; j < count; j++) out[j] /= Math.sin((fromDeg + (j + 0.5) * stepDeg) * DEG);
  return out;
}
