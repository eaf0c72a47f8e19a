// Colours for the screen: the service's sRGB values when it sent sRGB, otherwise sRGB derived from its XYZ.

/** XYZ (D65) to linear sRGB, IEC 61966-2-1:1999 §5.2 (the inverse of its RGB→XYZ matrix, 4 decimals). */
const XYZ_TO_LINEAR_SRGB = [
  [3.2406, -1.5372, -0.4986],
  [-0.9689, 1.8758, 0.0415],
  [0.0557, -0.204, 1.057],
];

/** sRGB transfer function, IEC 61966-2-1:1999 §5.2 eq. 8. */
export function encodeSrgb(linear) {
  const v = Math.min(Math.max(linear, 0), 1);
  return v <= 0.0031308 ? 12.92 * v : 1.055 * v ** (1 / 2.4) - 0.055;
}

/** Inverse of encodeSrgb, IEC 61966-2-1:1999 §5.2 eq. 6. */
export function decodeSrgb(encoded) {
  return encoded <= 0.04045 ? encoded / 12.92 : ((encoded + 0.055) / 1.055) ** 2.4;
}

/**
 * Per angle sample: `encoded` (0–255 sRGB, for the strip) and `linear` (linear sRGB, 1 = the peak's luminance, for
 * compositing the camera preview). With space "srgb" the service's own gamut handling is kept.
 */
export function displayColours(profile) {
  const n = profile.anglesDeg.length;
  const encoded = new Uint8ClampedArray(3 * n);
  const linear = new Float32Array(3 * n);
  if (profile.space === "srgb") {
    profile.rgb.forEach((rgb, i) => {
      for (let c = 0; c < 3; c++) {
        encoded[3 * i + c] = Math.round(255 * rgb[c]);
        linear[3 * i + c] = decodeSrgb(Math.min(Math.max(rgb[c], 0), 1));
      }
    });
    return { encoded, linear, derived: false };
  }
  const peakY = Math.max(...profile.xyz.map((t) => t[1])) || 1;
  profile.xyz.forEach((xyz, i) => {
    for (let c = 0; c < 3; c++) {
      const row = XYZ_TO_LINEAR_SRGB[c];
      const v = Math.min(Math.max((row[0] * xyz[0] + row[1] * xyz[1] + row[2] * xyz[2]) / peakY, 0), 1);
      linear[3 * i + c] = v;
      encoded[3 * i + c] = Math.round(255 * encodeSrgb(v));
    }
  });
  return { encoded, linear, derived: true };
}

/** Index of the sample nearest to psiDeg on the profile's evenly spaced angles (clamped to its ends). */
export function nearestSample(anglesDeg, psiDeg) {
  const n = anglesDeg.length;
  if (n < 2) return 0;
  const i = Math.round(((psiDeg - anglesDeg[0]) / (anglesDeg[n - 1] - anglesDeg[0])) * (n - 1));
  return Math.min(Math.max(i, 0), n - 1);
}
