// Where the bows are: luminance maxima near the angles that Descartes' minimum-deviation condition predicts, or, for
// flattened drops, whose bows leave those windows along the arc, luminance maxima told apart by their dispersion.

/**
 * Search windows for ψ (degrees). The primary sits at 40.6–42.4° and the secondary at 50.2–53.6° across
 * 400–700 nm for water (computed from Descartes' condition with IAPWS R9-97's index: docs/checks.md); small drops
 * move the primary inwards by up to ~4° and the secondary outwards by ~7° (Airy 1838's displacement of the main
 * maximum at 10 µm, computed there too).
 */
export const PRIMARY_WINDOW_DEG = [30, 46] as const;
export const SECONDARY_WINDOW_DEG = [46.5, 62] as const;

export interface BowPeaks {
  primaryDeg: number | null;
  secondaryDeg: number | null;
}

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

export function findBows(anglesDeg: Float64Array, luminance: Float64Array): BowPeaks {
  return {
    primaryDeg: peakInWindow(anglesDeg, luminance, PRIMARY_WINDOW_DEG),
    secondaryDeg: peakInWindow(anglesDeg, luminance, SECONDARY_WINDOW_DEG),
  };
}

/** Radiance of a profile by sample and wavelength (row-major: sample i, wavelength l at i·count + l). */
export interface SpectralRadiance {
  anglesDeg: Float64Array;
  wavelengthsNm: Float64Array;
  radiance: Float64Array;
}

/** Half-width of the neighbourhood whose centroids are compared: wider than a bow's red–blue spread (≈ 1.8° for the primary of spheres, Descartes' condition at 420 and 660 nm). */
const DISPERSION_HALF_WIDTH_DEG = 1.5;

/**
 * Bows of flattened drops: along the arc the primary moves from about 28° to 42° and the secondary from about 44° to
 * 52° (measured: for 1 mm drops and the sun at 10°, a 2D ray trace through the drop's vertical outline puts the
 * top's primary at 28–30° and its secondary at 44–46°), so the fixed windows mislabel them. A bow is told by its dispersion instead: ψ of the primary's fold falls as the
 * refractive index rises, so red light peaks outside blue light, and the secondary's the other way (Descartes'
 * condition, Born & Wolf 1999 §3.2.2 for the refraction, common practice for the colour order). primaryDeg is the
 * brightest interior luminance maximum whose long-wavelength centroid (the longest third of the request's wavelengths)
 * lies outside its short-wavelength centroid (the shortest third), secondaryDeg the brightest outside it with the
 * opposite order; null when there is none. Only maxima that are the brightest within ±DISPERSION_HALF_WIDTH_DEG count. With
 * one wavelength there is no colour order and the windows decide.
 */
/** Whether luminance[i] is the largest within ±halfWidthDeg of anglesDeg[i]. */
function brightestAround(anglesDeg: Float64Array, luminance: Float64Array, i: number, halfWidthDeg: number): boolean {
  for (let j = i - 1; j >= 0 && anglesDeg[i] - anglesDeg[j] <= halfWidthDeg; j--) if (luminance[j] > luminance[i]) return false;
  for (let j = i + 1; j < anglesDeg.length && anglesDeg[j] - anglesDeg[i] <= halfWidthDeg; j++) if (luminance[j] > luminance[i]) return false;
  return true;
}

export function findBowsByDispersion(profile: SpectralRadiance, luminance: Float64Array): BowPeaks {
  const { anglesDeg, wavelengthsNm } = profile;
  const shortestNm = wavelengthsNm[0];
  const longestNm = wavelengthsNm[wavelengthsNm.length - 1];
  // One wavelength has no colour order: the windows are all there is.
  if (!(longestNm > shortestNm)) return findBows(anglesDeg, luminance);
  // The shortest and the longest third of the request's wavelengths.
  const third = (longestNm - shortestNm) / 3;
  const blueBandNm = [shortestNm, shortestNm + third] as const;
  const redBandNm = [longestNm - third, longestNm] as const;
  const maxima: { at: number; shift: number }[] = [];
  for (let i = 1; i + 1 < anglesDeg.length; i++) {
    if (!(luminance[i] > luminance[i - 1] && luminance[i] >= luminance[i + 1])) continue;
    // A bow is the brightest within its neighbourhood: a ripple on a slope (the canting mean's sampling, a few % of
    // the peak) is not one.
    if (!brightestAround(anglesDeg, luminance, i, DISPERSION_HALF_WIDTH_DEG)) continue;
    const shift = bandCentroid(profile, i, redBandNm) - bandCentroid(profile, i, blueBandNm);
    if (Math.abs(shift) > 0) maxima.push({ at: i, shift });
  }
  const brightest = (of: { at: number }[]) => of.reduce((best, m) => (best < 0 || luminance[m.at] > luminance[best] ? m.at : best), -1);
  const primary = brightest(maxima.filter((m) => m.shift > 0));
  // The secondary lies outside the primary (Alexander's dark band between them); the primary's supernumeraries,
  // inside it, can show the secondary's colour order where their spacing grows with the wavelength.
  const secondary = brightest(maxima.filter((m) => m.shift < 0 && (primary < 0 || m.at > primary)));
  return { primaryDeg: primary < 0 ? null : anglesDeg[primary], secondaryDeg: secondary < 0 ? null : anglesDeg[secondary] };
}

/** ψ centroid of the band's radiance over the samples within DISPERSION_HALF_WIDTH_DEG of sample `at` (ψ ascending). */
function bandCentroid(profile: SpectralRadiance, at: number, band: readonly [number, number]): number {
  const { anglesDeg, wavelengthsNm, radiance } = profile;
  const count = wavelengthsNm.length;
  let from = at;
  while (from > 0 && anglesDeg[at] - anglesDeg[from - 1] <= DISPERSION_HALF_WIDTH_DEG) from--;
  let weight = 0;
  let moment = 0;
  for (let i = from; i < anglesDeg.length && anglesDeg[i] - anglesDeg[at] <= DISPERSION_HALF_WIDTH_DEG; i++) {
    let power = 0;
    for (let l = 0; l < count; l++) if (wavelengthsNm[l] >= band[0] && wavelengthsNm[l] <= band[1]) power += radiance[i * count + l];
    weight += power;
    moment += power * (anglesDeg[i] - anglesDeg[at]);
  }
  return weight > 0 ? moment / weight : Number.NaN;
}
