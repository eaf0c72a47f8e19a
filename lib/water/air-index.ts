// Refractive index of standard dry air (15 °C, 101 325 Pa, 0 % humidity, 450 ppm CO2) relative to vacuum,
// Ciddor 1996 (Appl. Opt. 35, 1566, Eq. 1), vacuum wavelength.

/** Fitted range, 230–1690 nm (from memory); below it (IAPWS reaches 200 nm) the formula is extrapolated. */
export const CIDDOR_1996_WAVELENGTH_NM = { min: 230, max: 1690 } as const;

// Ciddor 1996 Eq. 1 constants: k0, k2 in µm⁻²; k1, k3 in µm⁻² (refractivity × 1e8).
const K0 = 238.0185;
const K1 = 5792105;
const K2 = 57.362;
const K3 = 167917;

/** n of standard dry air at the given vacuum wavelength. */
export function standardAirIndex(wavelengthNm: number): number {
  const sigma2 = (1000 / wavelengthNm) ** 2;
  return 1 + (K1 / (K0 - sigma2) + K3 / (K2 - sigma2)) * 1e-8;
}
