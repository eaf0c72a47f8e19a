// Ray geometry in a sphere for a ray with k internal reflections (p = k + 1 chords), impact parameter b = sin i
// in units of the radius (van de Hulst 1957, Light Scattering by Small Particles, ch. 12–13; section numbers
// cited below are from memory).

export interface RainbowRay {
  /** Impact parameter of the stationary (rainbow) ray, units of the drop radius. */
  impactParameter: number;
  incidenceDeg: number;
  /** Total deviation D, not reduced (e.g. 230.5° for the secondary). */
  deviationDeg: number;
  /** Scattering angle Θ ∈ [0°, 180°] (0° forward). */
  scatteringAngleDeg: number;
  /** Angle from the antisolar point ψ = 180° − Θ. */
  antisolarAngleDeg: number;
  /** d²D/db² at the rainbow ray, rad per (radius)². */
  curvature: number;
  /** dΘ/dD at the rainbow ray (+1 or −1): on the lit side sign·(Θ − Θ_R) > 0. */
  scatteringSign: 1 | -1;
}

const DEG = 180 / Math.PI;

function chords(internalReflections: number): number {
  if (!Number.isInteger(internalReflections) || internalReflections < -1) {
    throw new RangeError(`internal reflections ${internalReflections} must be an integer ≥ −1`);
  }
  return internalReflections + 1;
}

/** Deviation D(b) = 2i − 2p·r + (p − 1)π with sin i = b, sin i = n sin r (van de Hulst 1957 §12.2); radians. */
export function deviationRad(n: number, internalReflections: number, impactParameter: number): number {
  const p = chords(internalReflections);
  const i = Math.asin(impactParameter);
  const r = Math.asin(impactParameter / n);
  return 2 * i - 2 * p * r + (p - 1) * Math.PI;
}

/** dD/db = 2/cos i − 2p/(n cos r), from differentiating D(b). */
export function deviationSlope(n: number, internalReflections: number, impactParameter: number): number {
  const p = chords(internalReflections);
  const b2 = impactParameter * impactParameter;
  return 2 / Math.sqrt(1 - b2) - (2 * p) / Math.sqrt(n * n - b2);
}

/** d²D/db² = 2b/cos³i − 2p·b/(n cos r)³, from differentiating D(b) twice. */
export function deviationCurvature(n: number, internalReflections: number, impactParameter: number): number {
  const p = chords(internalReflections);
  const b = impactParameter;
  const b2 = b * b;
  return (2 * b) / (1 - b2) ** 1.5 - (2 * p * b) / (n * n - b2) ** 1.5;
}

/** Reduces a deviation to the scattering angle Θ ∈ [0, π] and the sign dΘ/dD there. */
export function scatteringAngleOfDeviation(deviation: number): { angle: number; sign: 1 | -1 } {
  const twoPi = 2 * Math.PI;
  const folded = ((deviation % twoPi) + twoPi) % twoPi;
  return folded <= Math.PI ? { angle: folded, sign: 1 } : { angle: twoPi - folded, sign: -1 };
}

/** Impact parameter of the rainbow ray, cos²i = (n² − 1)/(p² − 1) (Descartes 1637; van de Hulst 1957 §13.1); null if none. */
export function rainbowImpactParameter(n: number, internalReflections: number): number | null {
  const p = chords(internalReflections);
  if (p < 2) return null;
  const cos2 = (n * n - 1) / (p * p - 1);
  if (!(cos2 > 0 && cos2 < 1)) return null;
  return Math.sqrt(1 - cos2);
}

/** Descartes' rainbow ray for real index n and k ≥ 1 internal reflections. */
export function descartesRay(n: number, internalReflections: number): RainbowRay {
  const b = rainbowImpactParameter(n, internalReflections);
  if (b === null) throw new RangeError(`no rainbow ray for n = ${n}, k = ${internalReflections}`);
  const deviation = deviationRad(n, internalReflections, b);
  const { angle, sign } = scatteringAngleOfDeviation(deviation);
  return {
    impactParameter: b,
    incidenceDeg: Math.asin(b) * DEG,
    deviationDeg: deviation * DEG,
    scatteringAngleDeg: angle * DEG,
    antisolarAngleDeg: 180 - angle * DEG,
    curvature: deviationCurvature(n, internalReflections, b),
    scatteringSign: sign,
  };
}
