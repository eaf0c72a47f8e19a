// Fresnel power reflectances at a water–air surface and the energy a ray keeps along its path in a sphere
// (equation and section numbers below from memory).

export interface PolarisedPair {
  /** Electric field perpendicular to the scattering plane (S1, TE). */
  perpendicular: number;
  /** Electric field parallel to the scattering plane (S2, TM). */
  parallel: number;
}

/**
 * Reflectances for incidence from outside at sin i = b on a medium of relative index n (Fresnel equations,
 * Born & Wolf 1999 §1.5.2 Eq. 21); by Stokes' relations the same values hold for the internal reflections.
 */
export function fresnelReflectance(n: number, impactParameter: number): PolarisedPair {
  const b2 = impactParameter * impactParameter;
  const cosI = Math.sqrt(1 - b2);
  const nCosR = Math.sqrt(n * n - b2);
  const cosR = nCosR / n;
  const rPerp = (cosI - nCosR) / (cosI + nCosR);
  const rPar = (n * cosI - cosR) / (n * cosI + cosR);
  return { perpendicular: rPerp * rPerp, parallel: rPar * rPar };
}

/**
 * Fraction ε² of a ray's power left after its path with k internal reflections: R for external reflection
 * (k = −1), (1 − R)²·R^k otherwise (van de Hulst 1957 §12.21).
 */
export function pathTransmittance(n: number, internalReflections: number, impactParameter: number): PolarisedPair {
  const r = fresnelReflectance(n, impactParameter);
  if (internalReflections === -1) return r;
  const keep = (reflectance: number) => (1 - reflectance) ** 2 * reflectance ** internalReflections;
  return { perpendicular: keep(r.perpendicular), parallel: keep(r.parallel) };
}
