// Density of air-free liquid water at 101.325 kPa, Kell 1975 (J. Chem. Eng. Data 20, 97, Eq. 16; IPTS-68),
// stated range 0–150 °C; its smooth rational form extrapolates sensibly into the supercooled range (−12 °C).

export const KELL_1975_TEMPERATURE_C = { min: 0, max: 150 } as const;

// Numerator coefficients (kg/m³ per °C^i) and denominator coefficient (per °C), Kell 1975 Eq. 16.
const NUMERATOR = [999.83952, 16.945176, -7.9870401e-3, -46.170461e-6, 105.56302e-9, -280.54253e-12] as const;
const DENOMINATOR_T = 16.87985e-3;

/** Liquid water density in kg/m³ at atmospheric pressure; no range check. */
export function liquidWaterDensityKgPerM3(temperatureC: number): number {
  let numerator = 0;
  for (let i = NUMERATOR.length - 1; i >= 0; i--) numerator = numerator * temperatureC + NUMERATOR[i];
  return numerator / (1 + DENOMINATOR_T * temperatureC);
}
