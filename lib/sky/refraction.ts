// Atmospheric refraction of a body's altitude: how much higher it appears than it is.

/** Pressure and temperature at which Saemundsson's formula holds as printed (Meeus 1998, Astronomical Algorithms, 2nd ed., ch. 16). */
export const REFRACTION_STANDARD_PRESSURE_HPA = 1010;
export const REFRACTION_STANDARD_TEMPERATURE_C = 10;

/**
 * Below this true altitude no refraction is applied: the sun's mean radius (0.26667°) plus the refraction at the
 * horizon (0.5667°) under the horizon, as in the NREL SPA (Reda & Andreas 2004, NREL/TP-560-34302, §3.14, eq. 42).
 */
export const REFRACTION_FLOOR_DEG = -(0.26667 + 0.5667);

export const REFRACTION_MODEL =
  "Saemundsson 1986 (Sky & Telescope 72, 70) with the pressure-temperature factor (P/1010 hPa)·(283 K/(273 K + T)) (Meeus 1998, ch. 16, eq. 16.4), applied to the airless topocentric altitude as in the NREL SPA (Reda & Andreas 2004, eq. 42)";

/**
 * Refraction in degrees for a true (airless) altitude: R = 1.02′ / tan(h + 10.3/(h + 5.11)) (Saemundsson 1986;
 * Meeus 1998 eq. 16.4), scaled by (P/1010)·(283/(273 + T)) (Meeus 1998, ch. 16); 0 below REFRACTION_FLOOR_DEG.
 */
export function refractionDeg(
  trueAltitudeDeg: number,
  pressureHpa = REFRACTION_STANDARD_PRESSURE_HPA,
  temperatureC = REFRACTION_STANDARD_TEMPERATURE_C,
): number {
  if (trueAltitudeDeg < REFRACTION_FLOOR_DEG) return 0;
  const argumentDeg = trueAltitudeDeg + 10.3 / (trueAltitudeDeg + 5.11);
  const arcmin = 1.02 / Math.tan((argumentDeg * Math.PI) / 180);
  return (pressureHpa / REFRACTION_STANDARD_PRESSURE_HPA) * (283 / (273 + temperatureC)) * (arcmin / 60);
}
