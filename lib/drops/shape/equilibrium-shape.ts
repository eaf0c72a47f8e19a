// Equilibrium shapes of falling raindrops by the model of Beard & Chuang (1987), J. Atmos. Sci. 44, 1509–1524:
// r(θ)/a = 1 + Σ_{n=0}^{10} c_n cos nθ (their Eq. 1), a the equal-volume radius, θ from the downward axis.

import { cosineSeriesOutline, type DropOutline } from "./outline.js";

/** Equal-volume diameters (mm) of the tabulated shapes. */
export const SHAPE_TABLE_DIAMETERS_MM = [1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5, 6, 6.5, 7, 8, 9] as const;

/**
 * Shape coefficients c_0 … c_10 × 10⁴ of the zero-field equilibrium drops of Chuang & Beard (1990), J. Atmos. Sci.
 * 47, 1374–1389, Table 1 (the Beard & Chuang 1987 model, tabulated by diameter), one row per diameter above.
 */
const SHAPE_TABLE_COEFFICIENTS_E4: readonly (readonly number[])[] = [
  [-28, 30, -83, 22, -3, -2, 1, 0, 0, 0, 0],
  [-72, 70, -210, 57, -6, -7, 3, 0, -1, 0, 1],
  [-134, 118, -385, 100, -5, -17, 6, 1, -3, -1, 1],
  [-211, 180, -592, 147, 4, -32, 10, 3, -5, -1, 2],
  [-297, 247, -816, 188, 24, -52, 13, 8, -8, -1, 4],
  [-388, 309, -1042, 221, 53, -75, 15, 15, -12, 0, 7],
  [-481, 359, -1263, 244, 91, -99, 15, 25, -16, -2, 10],
  [-573, 401, -1474, 255, 137, -121, 11, 36, -19, -6, 13],
  [-665, 435, -1674, 258, 187, -141, 4, 48, -21, -11, 17],
  [-755, 465, -1863, 251, 242, -157, -7, 61, -21, -17, 21],
  [-843, 472, -2040, 240, 299, -168, -21, 73, -20, -25, 24],
  [-930, 487, -2207, 222, 358, -175, -37, 84, -16, -34, 27],
  [-1014, 492, -2364, 199, 419, -178, -56, 93, -12, -43, 30],
  [-1187, 482, -2650, 148, 543, -171, -100, 107, 2, -64, 32],
  [-1328, 403, -2899, 106, 662, -153, -146, 111, 18, -81, 31],
];

export const SHAPE_TABLE_MAX_DIAMETER_MM = SHAPE_TABLE_DIAMETERS_MM[SHAPE_TABLE_DIAMETERS_MM.length - 1];

/**
 * c_0 … c_10 for an equal-volume diameter: linear in D between the tabulated diameters; below 1 mm the 1 mm row
 * scaled by (D/1 mm)³, as the distortion of a small drop follows its Weber number ρv²D/σ with a fall speed v
 * roughly ∝ D there: the axis ratios Pruppacher & Pitter (1971, J. Atmos. Sci. 28, 86) measured between 0.34 and
 * 1.06 mm give 1 − q growing as D^2.8–3.1 (fixtures/drop-shapes, test/lib/drops/shape.test.ts).
 */
export function equilibriumShapeCoefficients(diameterMm: number): Float64Array {
  const d = SHAPE_TABLE_DIAMETERS_MM;
  if (!(diameterMm > 0 && diameterMm <= SHAPE_TABLE_MAX_DIAMETER_MM)) {
    throw new RangeError(`equilibrium shapes are tabulated up to ${SHAPE_TABLE_MAX_DIAMETER_MM} mm diameter, not ${diameterMm}`);
  }
  const out = new Float64Array(11);
  if (diameterMm <= d[0]) {
    const scale = (diameterMm / d[0]) ** 3;
    SHAPE_TABLE_COEFFICIENTS_E4[0].forEach((c, n) => (out[n] = c * 1e-4 * scale));
    return out;
  }
  let i = 0;
  while (i + 2 < d.length && d[i + 1] < diameterMm) i++;
  const t = (diameterMm - d[i]) / (d[i + 1] - d[i]);
  for (let n = 0; n < 11; n++) {
    out[n] = 1e-4 * ((1 - t) * SHAPE_TABLE_COEFFICIENTS_E4[i][n] + t * SHAPE_TABLE_COEFFICIENTS_E4[i + 1][n]);
  }
  return out;
}

/** The equilibrium outline of a drop of equal-volume radius radiusUm. */
export function equilibriumOutline(radiusUm: number): DropOutline {
  return cosineSeriesOutline(equilibriumShapeCoefficients((2 * radiusUm) / 1000));
}
