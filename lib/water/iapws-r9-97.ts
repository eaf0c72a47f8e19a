// Refractive index of ordinary water substance, IAPWS R9-97 (Harvey, Gallagher & Levelt Sengers 1998,
// J. Phys. Chem. Ref. Data 27, 761). Index relative to vacuum, vacuum wavelength (the convention of public IAPWS
// implementations, whose tests reproduce the release's Table 3 with it; equation/table numbers below from memory).

/** Validity of IAPWS R9-97 (release text): 0.2–1.1 µm, 261.15–773.15 K, 0–1060 kg/m³. */
export const IAPWS_R9_97_WAVELENGTH_NM = { min: 200, max: 1100 } as const;
export const IAPWS_R9_97_TEMPERATURE_K = { min: 261.15, max: 773.15 } as const;
export const IAPWS_R9_97_DENSITY_KG_PER_M3 = { min: 0, max: 1060 } as const;

// Coefficients a0..a7 and the UV/IR resonance wavelengths, IAPWS R9-97 Table 2.
const A0 = 0.244257733;
const A1 = 9.74634476e-3;
const A2 = -3.73234996e-3;
const A3 = 2.68678472e-4;
const A4 = 1.5892057e-3;
const A5 = 2.45934259e-3;
const A6 = 0.90070492;
const A7 = -1.66626219e-2;
const LAMBDA_UV_REDUCED = 0.229202;
const LAMBDA_IR_REDUCED = 5.432937;

// Reference values of the reduced variables, IAPWS R9-97 Eq. 6.
const REFERENCE_DENSITY_KG_PER_M3 = 1000;
const REFERENCE_TEMPERATURE_K = 273.15;
const REFERENCE_WAVELENGTH_NM = 589;

/** Real refractive index of water (relative to vacuum) at a vacuum wavelength; no range checks. */
export function iapwsRefractiveIndex(wavelengthNm: number, temperatureK: number, densityKgPerM3: number): number {
  const rho = densityKgPerM3 / REFERENCE_DENSITY_KG_PER_M3;
  const t = temperatureK / REFERENCE_TEMPERATURE_K;
  const l2 = (wavelengthNm / REFERENCE_WAVELENGTH_NM) ** 2;
  // Lorentz–Lorenz function divided by reduced density, IAPWS R9-97 Eq. 7.
  const lorentzLorenzPerDensity =
    A0 +
    A1 * rho +
    A2 * t +
    A3 * l2 * t +
    A4 / l2 +
    A5 / (l2 - LAMBDA_UV_REDUCED ** 2) +
    A6 / (l2 - LAMBDA_IR_REDUCED ** 2) +
    A7 * rho * rho;
  const q = lorentzLorenzPerDensity * rho;
  // Inverting (n² − 1)/(n² + 2) = q.
  return Math.sqrt((1 + 2 * q) / (1 - q));
}
