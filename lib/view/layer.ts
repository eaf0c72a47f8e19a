// Image of a bow layer from a 1-D profile: each pixel's ray → angle ψ from the antisolar point → colour by linear
// interpolation in ψ. Bows are circles about the antisolar point (Descartes 1637: every bow ray leaves at one angle to the sun's rays), so ψ is all a
// pixel needs, apart from the polariser, which also needs the bow's local tangent.

import type { RayField } from "./ray-field.js";
import { PolarisedLight, addBowParts, addReflectionBow, mirroredInHorizon, reflectOffWater, sensed, type WaterSurface } from "./water-reflection.js";
import { type Vec3, RADIANS_PER_DEGREE } from "./vectors.js";
import { arcFrame, arcPositionInFrame } from "./arc-position.js";
import { ArcBlender, type ArcSlices } from "./arc-slices.js";

/** Linear colours (3 per sample) on evenly spaced angles ψ = fromDeg + i·stepDeg. */
export interface ProfileColours {
  fromDeg: number;
  stepDeg: number;
  count: number;
  /** Unpolarised total. */
  total: Float64Array;
  /** The parts polarised perpendicular (along the bow's tangent) and parallel to the scattering plane. */
  perpendicular: Float64Array;
  parallel: Float64Array;
}

export interface LayerInput {
  rays: RayField;
  /** Unit vector to the antisolar point (−sun). */
  antisolar: Vec3;
  colours: ProfileColours;
  /** True: flat ground hides every ray with z < 0. */
  ground: boolean;
  /** The rain curtain covers the sky out to this ψ; beyond it a pixel gets neither light nor alpha. */
  maxAngleDeg: number;
  /** Alpha of every pixel that sees rain (1 − T of the curtain); undefined for an RGB-only additive layer. */
  alpha?: number;
  /** Transmission axis of a linear polariser as a world direction (square to the optical axis), or none. */
  polariserAxis?: Vec3;
  /** Instead of an axis: a polariser at a fixed angle to the bow's tangent, given as its cos² (Malus's law). */
  polariserTangentCos2?: number;
  /** Calm water below the horizon (in place of the ground): the reflection bow, and the bows mirrored in it. */
  water?: WaterSurface;
  /**
   * A bow that changes along its arc (flattened drops): profiles at arc positions, blended per pixel (arc-slices.ts);
   * `colours` is then one of them, for the ψ grid. Not with water (its reflection bow needs other profiles).
   */
  arc?: ArcSlices;
}

export interface Layer {
  widthPx: number;
  heightPx: number;
  channels: 3 | 4;
  /** Row-major from the top row, `channels` samples per pixel. */
  data: Float32Array;
}

/** ψ of a unit ray d, degrees: the angle between d and the unit antisolar vector a (atan2 form, exact near 0°). */
export function angleFromAntisolarDeg(d: ArrayLike<number>, a: ArrayLike<number>): number {
  const cx = a[1] * d[2] - a[2] * d[1];
  const cy = a[2] * d[0] - a[0] * d[2];
  const cz = a[0] * d[1] - a[1] * d[0];
  // √ of the sum of squares, not Math.hypot (several times slower in V8): unit vectors cannot overflow.
  return Math.atan2(Math.sqrt(cx * cx + cy * cy + cz * cz), a[0] * d[0] + a[1] * d[1] + a[2] * d[2]) / RADIANS_PER_DEGREE;
}

/**
 * Smallest and largest ψ (up to maxAngleDeg) over the pixels that see rain; null when none does. onSeen is told of
 * each such pixel's ray and ψ (the ray's array is reused).
 */
export function angleRangeDeg(
  rays: RayField,
  antisolar: Vec3,
  ground: boolean,
  maxAngleDeg = 180,
  onSeen?: (d: Float64Array, psiDeg: number) => void,
): { minDeg: number; maxDeg: number } | null {
  const d = new Float64Array(3);
  let minDeg = Infinity;
  let maxDeg = -Infinity;
  for (let y = 0; y < rays.heightPx; y++) {
    for (let x = 0; x < rays.widthPx; x++) {
      if (!rays.ray(x, y, d) || (ground && d[2] < 0)) continue;
      const psi = angleFromAntisolarDeg(d, antisolar);
      if (psi > maxAngleDeg) continue;
      onSeen?.(d, psi);
      if (psi < minDeg) minDeg = psi;
      if (psi > maxDeg) maxDeg = psi;
    }
  }
  return minDeg <= maxDeg ? { minDeg, maxDeg } : null;
}

/**
 * Share of the bow-tangent (perpendicular) field that an ideal polariser passes for ray d, cos²α (Malus's law):
 * α is the angle between the bow's tangent t = a × d / |a × d| and the polariser's axis p projected onto the
 * plane square to the ray. The radial (parallel) field passes sin²α = 1 − cos²α. Returns ½ where either is undefined.
 */
export function tangentTransmission(d: ArrayLike<number>, a: ArrayLike<number>, p: ArrayLike<number>): number {
  let tx = a[1] * d[2] - a[2] * d[1];
  let ty = a[2] * d[0] - a[0] * d[2];
  let tz = a[0] * d[1] - a[1] * d[0];
  const tn = Math.sqrt(tx * tx + ty * ty + tz * tz);
  const pd = p[0] * d[0] + p[1] * d[1] + p[2] * d[2];
  const px = p[0] - pd * d[0];
  const py = p[1] - pd * d[1];
  const pz = p[2] - pd * d[2];
  const pn = Math.sqrt(px * px + py * py + pz * pz);
  if (tn < 1e-12 || pn < 1e-12) return 0.5;
  tx /= tn;
  ty /= tn;
  tz /= tn;
  const c = (px * tx + py * ty + pz * tz) / pn;
  return c * c;
}

export function renderLayer(input: LayerInput): Layer {
  const { rays, antisolar, colours, ground, alpha, polariserAxis, maxAngleDeg } = input;
  const polarised = polariserAxis !== undefined || input.polariserTangentCos2 !== undefined;
  const { widthPx, heightPx } = rays;
  const channels = alpha === undefined ? 3 : 4;
  const data = new Float32Array(widthPx * heightPx * channels);
  const d = new Float64Array(3);
  const last = colours.count - 1;
  // Half a part in a million of a step: ψ at the profile's ends still counts as inside after round-off.
  const slack = 1e-6;
  const water = input.water;
  // Two parts for the bow and two for each reflection bow (one per group of glitter facets on rough water).
  const reflectionBows = water?.rough ? water.rough.surfaces.length : 1;
  const sky = new PolarisedLight(2 + 2 * reflectionBows);
  const mirrored = new PolarisedLight(2 * (2 + 2 * reflectionBows));
  const reflected = new Float64Array(3);
  if (input.arc && water) throw new Error("renderLayer: a bow that changes along its arc is not drawn with water");
  const arc = input.arc ? new ArcBlender(input.arc) : undefined;
  const frame = arcFrame(antisolar);
  for (let y = 0; y < heightPx; y++) {
    for (let x = 0; x < widthPx; x++) {
      if (!rays.ray(x, y, d)) continue;
      if (water && d[2] < 0) {
        waterPixel(input, water, d, reflected, sky, mirrored, data, (y * widthPx + x) * channels);
        continue;
      }
      if (ground && d[2] < 0) continue;
      const psi = angleFromAntisolarDeg(d, antisolar);
      if (psi > maxAngleDeg) continue;
      const at = (y * widthPx + x) * channels;
      if (alpha !== undefined) data[at + 3] = alpha;
      const t = (psi - colours.fromDeg) / colours.stepDeg;
      if (t < -slack || t > last + slack) continue;
      const c2 = !polarised ? undefined : polariserAxis ? tangentTransmission(d, antisolar, polariserAxis) : input.polariserTangentCos2!;
      if (arc) {
        const s = arc.at(arcPositionInFrame(d, frame), psi);
        addSample(arc.arc.slices[s.k0], s.psi0Deg, s.w0, c2, data, at);
        if (s.w1 > 0) addSample(arc.arc.slices[s.k1], s.psi1Deg, s.w1, c2, data, at);
      } else addSample(colours, psi, 1, c2, data, at);
      if (water) {
        sky.clear();
        addReflectionBows(sky, colours, d, water);
        sensed(sky, d, polariserAxis, data, at);
      }
    }
  }
  return { widthPx, heightPx, channels, data };
}

/**
 * Adds weight × the colour at ψ (linear in ψ between samples, clamped to the grid) to the pixel at `at`: the
 * total, or with a polariser c2 × the tangential part + (1 − c2) × the radial part (Malus's law).
 */
function addSample(colours: ProfileColours, psiDeg: number, weight: number, c2: number | undefined, data: Float32Array, at: number): void {
  const last = colours.count - 1;
  const t = (psiDeg - colours.fromDeg) / colours.stepDeg;
  const i0 = Math.min(Math.max(Math.floor(t), 0), Math.max(last - 1, 0));
  const i1 = Math.min(i0 + 1, last);
  const w1 = Math.min(Math.max(t - i0, 0), 1);
  const w0 = 1 - w1;
  if (c2 !== undefined) {
    const s2 = 1 - c2;
    const a = colours.perpendicular;
    const b = colours.parallel;
    for (let k = 0; k < 3; k++) {
      const perp = w0 * a[3 * i0 + k] + w1 * a[3 * i1 + k];
      const par = w0 * b[3 * i0 + k] + w1 * b[3 * i1 + k];
      data[at + k] += weight * (c2 * perp + s2 * par);
    }
  } else {
    const c = colours.total;
    for (let k = 0; k < 3; k++) data[at + k] += weight * (w0 * c[3 * i0 + k] + w1 * c[3 * i1 + k]);
  }
}

/**
 * A pixel whose ray meets the water: the sky's light from the mirrored direction (the bow and the reflection bow,
 * where rain is seen there), reflected by the water. Its alpha is the curtain's opacity times the water's
 * reflectance: the curtain dims the reflected part of the water's light, not the light from below the surface.
 */
function waterPixel(
  input: LayerInput,
  water: WaterSurface,
  d: Float64Array,
  up: Float64Array,
  sky: PolarisedLight,
  mirrored: PolarisedLight,
  data: Float32Array,
  at: number,
): void {
  const m = mirroredInHorizon(d);
  up[0] = m[0];
  up[1] = m[1];
  up[2] = m[2];
  const psi = angleFromAntisolarDeg(up, input.antisolar);
  if (psi > input.maxAngleDeg) return;
  sky.clear();
  addBowParts(sky, input.colours, up, input.antisolar, psi, 1, 1);
  addReflectionBows(sky, input.colours, up, water);
  mirrored.clear();
  const reflectance = reflectOffWater(sky, mirrored, d, water.refractiveIndex);
  sensed(mirrored, d, input.polariserAxis, data, at);
  if (input.alpha !== undefined) data[at + 3] = input.alpha * reflectance;
}

/** The reflection bow along d: about the mirrored antisolar point (calm water), or one per glitter group (rough water). */
function addReflectionBows(light: PolarisedLight, colours: ProfileColours, d: ArrayLike<number>, water: WaterSurface): void {
  if (!water.rough) {
    addReflectionBow(light, colours, d, water, angleFromAntisolarDeg(d, water.reflectedAntisolar));
    return;
  }
  for (const group of water.rough.surfaces) addReflectionBow(light, colours, d, group, angleFromAntisolarDeg(d, group.reflectedAntisolar));
}
