// How lookup-texture texels map to the angle ψ from the antisolar point and to the drop-size axis. The same
// formulas are written into the manifest and the shader snippets, so a shader samples exactly what was baked.

export type AngleMapping = "linear" | "bow-weighted";

/**
 * "bow-weighted" packs texels around the bows: ψ(u) = c + s·sinh(a0 + u·(a1 − a0)), a = asinh((ψ − c)/s), so the
 * texel density falls off as 1/cosh away from c. c = 46.5° sits between the primary (≈ 42°) and the secondary
 * (≈ 51°) (Descartes angles for water, docs/checks.md) and s = 4° keeps both bows in the dense part (our choice).
 */
export const BOW_WEIGHTED_CENTRE_DEG = 46.5;
export const BOW_WEIGHTED_SCALE_DEG = 4;

export interface AngleAxis {
  fromDeg: number;
  toDeg: number;
  texels: number;
  mapping: AngleMapping;
}

/** ψ at texel coordinate u ∈ [0, 1] (texel i has its centre at u = (i + 0.5)/texels). */
export function angleAtU(axis: AngleAxis, u: number): number {
  if (axis.mapping === "linear") return axis.fromDeg + u * (axis.toDeg - axis.fromDeg);
  const c = BOW_WEIGHTED_CENTRE_DEG;
  const s = BOW_WEIGHTED_SCALE_DEG;
  const a0 = Math.asinh((axis.fromDeg - c) / s);
  const a1 = Math.asinh((axis.toDeg - c) / s);
  return c + s * Math.sinh(a0 + u * (a1 - a0));
}

/** The inverse: u of an angle ψ (what a shader computes from its view ray). */
export function uAtAngle(axis: AngleAxis, psiDeg: number): number {
  if (axis.mapping === "linear") return (psiDeg - axis.fromDeg) / (axis.toDeg - axis.fromDeg);
  const c = BOW_WEIGHTED_CENTRE_DEG;
  const s = BOW_WEIGHTED_SCALE_DEG;
  const a0 = Math.asinh((axis.fromDeg - c) / s);
  const a1 = Math.asinh((axis.toDeg - c) / s);
  return (Math.asinh((psiDeg - c) / s) - a0) / (a1 - a0);
}

export function texelAngles(axis: AngleAxis): Float64Array {
  return Float64Array.from({ length: axis.texels }, (_, i) => angleAtU(axis, (i + 0.5) / axis.texels));
}

/** Drop-size rows are log-spaced: value(v) = from·(to/from)^v at texel centres v = (j + 0.5)/texels. */
export function logAxisValues(from: number, to: number, texels: number): Float64Array {
  if (texels === 1) return Float64Array.of(Math.sqrt(from * to));
  return Float64Array.from({ length: texels }, (_, j) => from * (to / from) ** ((j + 0.5) / texels));
}
