// A calm water surface below the horizon: the sun's light reflected by the water lights the rain from below the
// horizon and makes a second bow (the reflection bow) about the antisolar point mirrored in the horizon; the water
// also shows the sky's bows mirrored. Each bow's light is kept as two linearly polarised parts (field along the
// bow's tangent, and radial), so that every reflection weighs its s and p parts by their own Fresnel reflectance.

import type { ProfileColours } from "./layer.js";
import { fresnelReflectance } from "../rays/fresnel.js";
import type { Vec3 } from "./vectors.js";
import { coxMunkMeanSquareSlope, glitterOf } from "./glitter.js";

export interface WaterSurface {
  /** Unit vector to the reflection bow's centre: the antisolar point mirrored in the horizon. */
  reflectedAntisolar: Vec3;
  /** Power reflectances of the water for the sunlight, field horizontal (s) and in the plane of incidence (p). */
  sunRs: number;
  sunRp: number;
  /** Horizontal unit vector of the s field of the reflected sunlight (square to the sun's vertical plane). */
  sunS: Vec3;
  /** Index of water relative to air, for the reflections along the view rays. */
  refractiveIndex: number;
  /**
   * Rough water: the glitter's groups of facets, each lighting the rain from its own direction (its reflection bow
   * about `reflectedAntisolar`, with its share of the sunlight in sunRs, sunRp). Absent for calm water.
   */
  rough?: { windSpeedMs: number; meanSquareSlope: number; totalReflectance: number; surfaces: WaterSurface[] };
}

/** The antisolar point mirrored in the horizon: where the light of the sun reflected by level water travels. */
export function mirroredInHorizon(v: ArrayLike<number>): Vec3 {
  return [v[0], v[1], -v[2]];
}

/**
 * The water surface for a sun direction: the reflectances of its light (Fresnel equations at incidence 90° − sun
 * elevation, Born & Wolf 1999 §1.5.2) and the direction of their s field.
 */
export function waterSurfaceFor(sunDirection: Vec3, antisolar: Vec3, refractiveIndex: number): WaterSurface {
  // sin(incidence) = cos(elevation) = the horizontal length of the unit sun direction.
  const horizontal = Math.hypot(sunDirection[0], sunDirection[1]);
  const r = fresnelReflectance(refractiveIndex, Math.min(1, horizontal));
  // s is square to the vertical plane holding the sun: z × (horizontal sun direction), normalised.
  const sunS: Vec3 = horizontal > 1e-12 ? [-sunDirection[1] / horizontal, sunDirection[0] / horizontal, 0] : [1, 0, 0];
  return { reflectedAntisolar: mirroredInHorizon(antisolar), sunRs: r.perpendicular, sunRp: r.parallel, sunS, refractiveIndex };
}

/**
 * Rough water for wind speed U: the calm surface's view-ray reflections, with the sunlight spread over the glitter
 * (glitter.ts, Cox & Munk 1954): one reflection bow per group of facets, each with the group's s and p shares.
 */
export function roughWaterSurfaceFor(sunDirection: Vec3, antisolar: Vec3, refractiveIndex: number, windSpeedMs: number): WaterSurface {
  const calm = waterSurfaceFor(sunDirection, antisolar, refractiveIndex);
  const glitter = glitterOf(sunDirection, refractiveIndex, coxMunkMeanSquareSlope(windSpeedMs));
  const surfaces = glitter.samples.map((g) => ({ ...calm, reflectedAntisolar: g.direction, sunRs: g.rs, sunRp: g.rp }));
  return { ...calm, rough: { windSpeedMs, meanSquareSlope: glitter.meanSquareSlope, totalReflectance: glitter.totalReflectance, surfaces } };
}

/** Light of one direction as incoherent linearly polarised parts: RGB and the unit field direction of each. */
export class PolarisedLight {
  readonly rgb: Float64Array[] = [];
  readonly field: Float64Array[] = [];
  count = 0;

  constructor(capacity: number) {
    for (let i = 0; i < capacity; i++) {
      this.rgb.push(new Float64Array(3));
      this.field.push(new Float64Array(3));
    }
  }

  clear(): void {
    this.count = 0;
  }

  add(r: number, g: number, b: number, fx: number, fy: number, fz: number, scale = 1): void {
    const k = this.count++;
    this.rgb[k][0] = r * scale;
    this.rgb[k][1] = g * scale;
    this.rgb[k][2] = b * scale;
    this.field[k][0] = fx;
    this.field[k][1] = fy;
    this.field[k][2] = fz;
  }
}

/** Unit vector along c × d (the tangent of the circle about c through d); false where d is at c or opposite it. */
function tangentOf(c: ArrayLike<number>, d: ArrayLike<number>, out: Float64Array): boolean {
  const tx = c[1] * d[2] - c[2] * d[1];
  const ty = c[2] * d[0] - c[0] * d[2];
  const tz = c[0] * d[1] - c[1] * d[0];
  const n = Math.hypot(tx, ty, tz);
  if (n < 1e-12) return false;
  out[0] = tx / n;
  out[1] = ty / n;
  out[2] = tz / n;
  return true;
}

const tangent = new Float64Array(3);

/**
 * Adds the bow about `centre` seen along d as two parts: the tangential field (the profile's perpendicular part)
 * and the radial field (its parallel part), each scaled by the incident light's share `weightPerp`/`weightPar`.
 * psiDeg: the angle between d and the centre. Returns false outside the profile.
 */
export function addBowParts(
  light: PolarisedLight,
  colours: ProfileColours,
  d: ArrayLike<number>,
  centre: ArrayLike<number>,
  psiDeg: number,
  weightPerp: number,
  weightPar: number,
): boolean {
  const last = colours.count - 1;
  const t = (psiDeg - colours.fromDeg) / colours.stepDeg;
  if (t < -1e-6 || t > last + 1e-6 || !tangentOf(centre, d, tangent)) return false;
  const i0 = Math.min(Math.max(Math.floor(t), 0), Math.max(last - 1, 0));
  const i1 = Math.min(i0 + 1, last);
  const w1 = Math.min(Math.max(t - i0, 0), 1);
  const w0 = 1 - w1;
  const a = colours.perpendicular;
  const b = colours.parallel;
  const at = (c: Float64Array, k: number) => w0 * c[3 * i0 + k] + w1 * c[3 * i1 + k];
  light.add(at(a, 0), at(a, 1), at(a, 2), tangent[0], tangent[1], tangent[2], weightPerp);
  // The radial field: square to the tangent and to the ray.
  const rx = d[1] * tangent[2] - d[2] * tangent[1];
  const ry = d[2] * tangent[0] - d[0] * tangent[2];
  const rz = d[0] * tangent[1] - d[1] * tangent[0];
  light.add(at(b, 0), at(b, 1), at(b, 2), rx, ry, rz, weightPar);
  return true;
}

/**
 * The reflection bow along d: lit by sunlight reflected from the water, whose s part (field along sunS, share Rs)
 * and p part (share Rp) each scatter as polarised light does: a field at angle φ to the bow's tangent gives
 * cos²φ of the tangential part and sin²φ of the radial one (van de Hulst 1957 §5.14: the scattered field's
 * components along and across the scattering plane).
 */
export function addReflectionBow(light: PolarisedLight, colours: ProfileColours, d: ArrayLike<number>, water: WaterSurface, psiDeg: number): void {
  if (!tangentOf(water.reflectedAntisolar, d, tangent)) return;
  const c = tangent[0] * water.sunS[0] + tangent[1] * water.sunS[1] + tangent[2] * water.sunS[2];
  const cos2 = c * c;
  const sin2 = 1 - cos2;
  // The profile's parts are for unpolarised light (half its power in each field): s carries Rs of one half and
  // p carries Rp of the other, so the tangential part scales by Rs·cos²φ + Rp·sin²φ and the radial one by
  // Rs·sin²φ + Rp·cos²φ.
  addBowParts(light, colours, d, water.reflectedAntisolar, psiDeg, water.sunRs * cos2 + water.sunRp * sin2, water.sunRs * sin2 + water.sunRp * cos2);
}

/**
 * Reflects the light of the mirrored direction into the view ray d (pointing below the horizon) off the water:
 * each part splits into s (field along the horizontal d × z) with reflectance Rs and p with Rp, at incidence
 * angle 90° + elevation of d (Fresnel equations, Born & Wolf 1999 §1.5.2). Returns the unpolarised reflectance.
 */
export function reflectOffWater(from: PolarisedLight, to: PolarisedLight, d: ArrayLike<number>, refractiveIndex: number): number {
  const horizontal = Math.hypot(d[0], d[1]);
  const r = fresnelReflectance(refractiveIndex, Math.min(1, horizontal));
  const sx = horizontal > 1e-12 ? d[1] / horizontal : 1;
  const sy = horizontal > 1e-12 ? -d[0] / horizontal : 0;
  // p: square to s and to the ray.
  const px = d[1] * 0 - d[2] * sy;
  const py = d[2] * sx - d[0] * 0;
  const pz = d[0] * sy - d[1] * sx;
  const pn = Math.hypot(px, py, pz) || 1;
  for (let k = 0; k < from.count; k++) {
    const f = from.field[k];
    const c = f[0] * sx + f[1] * sy;
    const cos2 = c * c;
    const rgb = from.rgb[k];
    to.add(rgb[0], rgb[1], rgb[2], sx, sy, 0, r.perpendicular * cos2);
    to.add(rgb[0], rgb[1], rgb[2], px / pn, py / pn, pz / pn, r.parallel * (1 - cos2));
  }
  return (r.perpendicular + r.parallel) / 2;
}

/**
 * What reaches the sensor of light `light` along ray d: all of it, or through an ideal linear polariser with the
 * transmission axis p (projected square to the ray), cos² of the angle between each part's field and the axis
 * (Malus's law).
 */
export function sensed(light: PolarisedLight, d: ArrayLike<number>, polariserAxis: ArrayLike<number> | undefined, out: Float32Array, at: number): void {
  let px = 0;
  let py = 0;
  let pz = 0;
  if (polariserAxis) {
    const pd = polariserAxis[0] * d[0] + polariserAxis[1] * d[1] + polariserAxis[2] * d[2];
    px = polariserAxis[0] - pd * d[0];
    py = polariserAxis[1] - pd * d[1];
    pz = polariserAxis[2] - pd * d[2];
    const pn = Math.hypot(px, py, pz);
    px /= pn;
    py /= pn;
    pz /= pn;
  }
  for (let k = 0; k < light.count; k++) {
    const f = light.field[k];
    const c = px * f[0] + py * f[1] + pz * f[2];
    const pass = polariserAxis ? c * c : 1;
    for (let ch = 0; ch < 3; ch++) out[at + ch] += pass * light.rgb[k][ch];
  }
}

/**
 * Smallest and largest ψ the water adds: the reflection bow's angle from its centre where a pixel sees rain in the
 * sky, and both bows' angles along the mirrored rays of pixels that see the water. Null when none.
 */
export function waterAngleRangeDeg(
  rays: { widthPx: number; heightPx: number; ray(x: number, y: number, out: Float64Array): boolean },
  antisolar: Vec3,
  water: WaterSurface,
  maxAngleDeg: number,
  angleDeg: (d: ArrayLike<number>, c: ArrayLike<number>) => number,
): { minDeg: number; maxDeg: number } | null {
  const d = new Float64Array(3);
  let minDeg = Infinity;
  let maxDeg = -Infinity;
  const seen = (psi: number) => {
    if (psi < minDeg) minDeg = psi;
    if (psi > maxDeg) maxDeg = psi;
  };
  for (let y = 0; y < rays.heightPx; y++) {
    for (let x = 0; x < rays.widthPx; x++) {
      if (!rays.ray(x, y, d)) continue;
      if (d[2] < 0) d[2] = -d[2];
      else {
        if (angleDeg(d, antisolar) <= maxAngleDeg) seen(angleDeg(d, water.reflectedAntisolar));
        continue;
      }
      const psi = angleDeg(d, antisolar);
      if (psi > maxAngleDeg) continue;
      seen(psi);
      seen(angleDeg(d, water.reflectedAntisolar));
    }
  }
  return minDeg <= maxDeg ? { minDeg, maxDeg } : null;
}
