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

/** Amplitude reflection coefficients at an interface, for the ray tracer through drops of any shape. */
export interface InterfaceAmplitudes {
  /** Real parts of r⊥, r∥ (all of them unless totally reflected). */
  rPerpRe: number;
  rPerpIm: number;
  rParRe: number;
  rParIm: number;
  /** √(1 − r²): transmitted amplitude normalised so that its square is the transmitted share of the power; 0 under total reflection. */
  tPerp: number;
  tPar: number;
  /** cos of the refraction angle (0 under total reflection). */
  cosRefraction: number;
}

/**
 * Fresnel amplitude coefficients from medium n1 into medium n2 at incidence cos i, with the parallel basis vector
 * p = s × k on each of the three rays (s = k × ν normalised): r⊥ = (n1 cos i − n2 cos t)/(n1 cos i + n2 cos t),
 * r∥ = (n2 cos i − n1 cos t)/(n2 cos i + n1 cos t) (Born & Wolf 1999 §1.5.2 Eq. 21). Beyond the critical angle
 * cos t = i·√(sin²t − 1) and |r| = 1 (Born & Wolf 1999 §1.5.4). The transmitted power share 1 − |r|² (energy
 * balance, Born & Wolf 1999 §1.5.3) is carried as the amplitude √(1 − r²) with the sign of t (positive).
 */
export function interfaceAmplitudes(n1: number, n2: number, cosIncidence: number, out: InterfaceAmplitudes): InterfaceAmplitudes {
  const ratio = n1 / n2;
  const sin2t = ratio * ratio * (1 - cosIncidence * cosIncidence);
  if (sin2t <= 1) {
    const cosT = Math.sqrt(1 - sin2t);
    const rPerp = (n1 * cosIncidence - n2 * cosT) / (n1 * cosIncidence + n2 * cosT);
    const rPar = (n2 * cosIncidence - n1 * cosT) / (n2 * cosIncidence + n1 * cosT);
    out.rPerpRe = rPerp;
    out.rPerpIm = 0;
    out.rParRe = rPar;
    out.rParIm = 0;
    out.tPerp = Math.sqrt(Math.max(0, 1 - rPerp * rPerp));
    out.tPar = Math.sqrt(Math.max(0, 1 - rPar * rPar));
    out.cosRefraction = cosT;
    return out;
  }
  // (a − ib)/(a + ib) = ((a² − b²) − 2iab)/(a² + b²).
  const q = Math.sqrt(sin2t - 1);
  const unitRatio = (a: number, b: number, re: "rPerpRe" | "rParRe", im: "rPerpIm" | "rParIm") => {
    const d = a * a + b * b;
    out[re] = (a * a - b * b) / d;
    out[im] = (-2 * a * b) / d;
  };
  unitRatio(n1 * cosIncidence, n2 * q, "rPerpRe", "rPerpIm");
  unitRatio(n2 * cosIncidence, n1 * q, "rParRe", "rParIm");
  out.tPerp = 0;
  out.tPar = 0;
  out.cosRefraction = 0;
  return out;
}
