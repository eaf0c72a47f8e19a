// Equilibrium drops of neighbouring radii share one traced geometry. The rays' paths through a drop depend on its
// shape, not its size (geometric optics is scale-free; only the wave parts, the Airy-type bows, scale with the size
// parameter x: van de Hulst 1957 §12.1), and equilibrium shapes change slowly with size (Beard & Chuang 1987 Eq. 1,
// coefficients smooth in D: Chuang & Beard 1990 Table 1). So radii are gathered on shape nodes evenly spaced in the
// deformation 1 − q (q the axis ratio): each radius's row is blended from the two bracketing nodes' rows, each at the
// radius's own x.

import { equilibriumOutline, SHAPE_TABLE_MAX_DIAMETER_MM } from "./equilibrium-shape.js";
import { outlineAxisRatio } from "./outline.js";

/** 1 − axis ratio of the equilibrium drop of equal-volume radius radiusUm (remembered: a task asks per drop and wavelength). */
export function equilibriumDeformation(radiusUm: number): number {
  const known = deformations.get(radiusUm);
  if (known !== undefined) return known;
  const deformation = 1 - outlineAxisRatio(equilibriumOutline(radiusUm));
  if (deformations.size > 100_000) deformations.clear();
  deformations.set(radiusUm, deformation);
  return deformation;
}
const deformations = new Map<number, number>();

const MAX_RADIUS_UM = (SHAPE_TABLE_MAX_DIAMETER_MM * 1000) / 2;
/** Node 0 (deformation 0) is a drop this small: its coefficients are 1e-9 of the 1 mm drop's, a sphere to the tracer. */
const SMALLEST_RADIUS_UM = 0.5;
const nodeRadii = new Map<string, number>();
let deepestDeformation = Number.NaN;
/** The deformation of the largest tabulated drop: no node lies beyond it. */
function deepest(): number {
  if (Number.isNaN(deepestDeformation)) deepestDeformation = equilibriumDeformation(MAX_RADIUS_UM);
  return deepestDeformation;
}

/**
 * The radius of the equilibrium drop whose deformation is k·step, by the Illinois variant of false position (Press et
 * al. 2007, Numerical Recipes §9.2; deformation grows with radius over the table's range: Chuang & Beard 1990 Table 1,
 * and as D³ below it, so the root is bracketed and unique). Remembered per (step, k).
 */
function nodeRadiusUm(k: number, step: number): number {
  const key = `${step}:${k}`;
  const known = nodeRadii.get(key);
  if (known !== undefined) return known;
  const target = k * step;
  let lo = SMALLEST_RADIUS_UM;
  let hi = MAX_RADIUS_UM;
  let fLo = equilibriumDeformation(lo) - target;
  let fHi = equilibriumDeformation(hi) - target;
  let radius = fLo >= 0 ? lo : hi;
  let side = 0;
  // Deformation to 1e-10 of the grid's: far below what moves a ray (1e-3 of flattening moves the bow by ~0.1°).
  for (let i = 0; i < 100 && fLo < 0 && fHi > 0; i++) {
    radius = (lo * fHi - hi * fLo) / (fHi - fLo);
    const f = equilibriumDeformation(radius) - target;
    if (Math.abs(f) <= 1e-10) break;
    if (f < 0) {
      [lo, fLo] = [radius, f];
      if (side === -1) fHi /= 2;
      side = -1;
    } else {
      [hi, fHi] = [radius, f];
      if (side === 1) fLo /= 2;
      side = 1;
    }
  }
  nodeRadii.set(key, radius);
  return radius;
}

/**
 * The shape nodes an equilibrium drop of radiusUm is traced with and their weights: the two nodes that bracket its
 * deformation on a grid of `step`, weighted linearly (Press et al. 2007 §3.1, Eq. 3.1.1), so that the rows of a size
 * distribution miss the drops' own shapes by O(step²) instead of the nearest node's O(step). Step 0, a drop on a node,
 * or beyond the last node: the drop's own shape alone.
 */
export function shapeNodeWeights(radiusUm: number, step: number): { radiusUm: number; weight: number }[] {
  if (!(step > 0)) return [{ radiusUm, weight: 1 }];
  const position = equilibriumDeformation(radiusUm) / step;
  const k = Math.floor(position);
  const t = position - k;
  if ((k + 1) * step > deepest()) return [{ radiusUm, weight: 1 }];
  if (t === 0) return [{ radiusUm: nodeRadiusUm(k, step), weight: 1 }];
  return [
    { radiusUm: nodeRadiusUm(k, step), weight: 1 - t },
    { radiusUm: nodeRadiusUm(k + 1, step), weight: t },
  ];
}
