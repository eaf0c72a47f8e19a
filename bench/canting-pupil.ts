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

const DEG = Math.PI / 180;

export interface PupilCantingGrid {
  /** Pupil step, units of the drop's equivalent radius. */
  du: number;
  /** Step of the sun's elevation relative to the drop's axis, degrees. */
  elevationStepDeg: number;
  /** Elevations over ±spanSd·σ about the sun's own. */
  spanSd: number;
}

/** The tilts (tx, ty: cantedAxis's, degrees) of the axis at elevation h′ of the sun above the drop's equator and azimuth δ about d_in. */
function tiltsOf(sunElevationDeg: number, relativeElevationDeg: number, azimuthDeg: number): [number, number, number] {
  const h = sunElevationDeg * DEG;
  const e = relativeElevationDeg * DEG;
  const d = azimuthDeg * DEG;
  // a = sin h′·(−d_in) + cos h′·(cos δ·t̂ + sin δ·ŷ), t̂ = (sin h, 0, cos h) the upward unit vector ⟂ d_in (bow-geometry.ts).
  const ax = -Math.sin(e) * Math.cos(h) + Math.cos(e) * Math.cos(d) * Math.sin(h);
  const ay = Math.cos(e) * Math.sin(d);
  const az = Math.sin(e) * Math.sin(h) + Math.cos(e) * Math.cos(d) * Math.cos(h);
  return [Math.atan2(ax, az) / DEG, Math.atan2(ay, az) / DEG, az];
}

/** Density of (h′, δ) per degree², from the tilts' Gaussian and the Jacobian ∂(tx, ty)/∂(h′, δ) (central differences). */
export function tiltDensity(sunElevationDeg: number, sdDeg: number, relativeElevationDeg: number, azimuthDeg: number): number {
  const [tx, ty, az] = tiltsOf(sunElevationDeg, relativeElevationDeg, azimuthDeg);
  // Axes below the horizontal are not tilts of a falling drop.
  if (az <= 0) return 0;
  const k = 1e-4;
  const [x1, y1] = tiltsOf(sunElevationDeg, relativeElevationDeg + k, azimuthDeg);
  const [x0, y0] = tiltsOf(sunElevationDeg, relativeElevationDeg - k, azimuthDeg);
  const [x3, y3] = tiltsOf(sunElevationDeg, relativeElevationDeg, azimuthDeg + k);
  const [x2, y2] = tiltsOf(sunElevationDeg, relativeElevationDeg, azimuthDeg - k);
  const jacobian = Math.abs((x1 - x0) * (y3 - y2) - (x3 - x2) * (y1 - y0)) / (4 * k * k);
  const gauss = (t: number) => Math.exp(-(t * t) / (2 * sdDeg * sdDeg)) / (sdDeg * Math.sqrt(2 * Math.PI));
  return gauss(tx) * gauss(ty) * jacobian;
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
