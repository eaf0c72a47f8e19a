// Where the bows are: luminance maxima near the angles that Descartes' minimum-deviation condition predicts.

/**
 * Search windows for ψ (degrees). The primary sits at 40.6–42.4° and the secondary at 50.2–53.6° across
 * 400–700 nm for water (computed from Descartes' condition with IAPWS R9-97's index: docs/checks.md); small drops
 * move the primary inwards by up to ~4° and the secondary outwards by ~7° (Airy 1838's displacement of the main
 * maximum at 10 µm, computed there too).
 */
export const PRIMARY_WINDOW_DEG = [30, 46] as const;
export const SECONDARY_WINDOW_DEG = [46.5, 62] as const;

/** ψ of the largest luminance inside the window if it is a true interior maximum there, else null. */
export function peakInWindow(anglesDeg: Float64Array, luminance: Float64Array, window: readonly [number, number]): number | null {
  let best = -1;
  for (let i = 0; i < anglesDeg.length; i++) {
    if (anglesDeg[i] < window[0] || anglesDeg[i] > window[1]) continue;
    if (best < 0 || luminance[i] > luminance[best]) best = i;
  }
  if (best <= 0 || best >= anglesDeg.length - 1) return null;
  if (anglesDeg[best - 1] < window[0] || anglesDeg[best + 1] > window[1]) return null;
  if (!(luminance[best] > luminance[best - 1] && luminance[best] >= luminance[best + 1])) return null;
  return anglesDeg[best];
}

export function findBows(anglesDeg: Float64Array, luminance: Float64Array): { primaryDeg: number | null; secondaryDeg: number | null } {
  return {
    primaryDeg: peakInWindow(anglesDeg, luminance, PRIMARY_WINDOW_DEG),
    secondaryDeg: peakInWindow(anglesDeg, luminance, SECONDARY_WINDOW_DEG),
  };
}
