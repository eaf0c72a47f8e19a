// Fresnel power reflectances at a water–air surface and the energy a ray keeps along its path in a sphere
// (equation and section numbers below from memory).

export interface PolarisedPair {
  /** Electric field perpendicular to the scattering plane (S1, TE). */
  perpendicular: number;
  /** Electric field parallel to the scattering plane (S2, TM). */
  parallel: number;
}

/**
 * Signed amplitude reflection coefficients r for incidence from outside at sin i = b on a medium of relative
 * index n (Fresnel equations, Born & Wolf 1999 §1.5.2 Eq. 21); inside the drop r′ = −r (Stokes' relations).
 */
export function fresnelAmplitudes(n: number, impactParameter: number): PolarisedPair {
  const b2 = impactParameter * impactParameter;
  const cosI = Math.sqrt(1 - b2);
  const nCosR = Math.sqrt(n * n - b2);
  const cosR = nCosR / n;
  return { perpendicular: (cosI - nCosR) / (cosI + nCosR), parallel: (n * cosI - cosR) / (n * cosI + cosR) };
}

/** Power reflectances R = r² (the same for the internal reflections, by Stokes' relations). */
export function fresnelReflectance(n: number, impactParameter: number): PolarisedPair {
  const r = fresnelAmplitudes(n, impactParameter);
  return { perpendicular: r.perpendicular * r.perpendicular, parallel: r.parallel * r.parallel };
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
