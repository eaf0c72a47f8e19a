// How colourful a profile is, as one number: used to compare what the eye and a camera see of the same bow.

/**
 * The largest CIE 1976 u′v′ distance of a sample from the luminance-weighted mean chromaticity (u′ = 4X/(X+15Y+3Z),
 * v′ = 9Y/(X+15Y+3Z): CIE 015:2018 eq. 8.12–8.13). Samples darker than a hundredth of the peak carry no visible
 * colour and are left out (common practice).
 */
export function chromaSpread(xyz: ArrayLike<ArrayLike<number>>): number {
  const uvY: [number, number, number][] = [];
  for (let i = 0; i < xyz.length; i++) {
    const [X, Y, Z] = [xyz[i][0], xyz[i][1], xyz[i][2]];
    const d = X + 15 * Y + 3 * Z;
    uvY.push(d > 0 ? [(4 * X) / d, (9 * Y) / d, Y] : [0, 0, 0]);
  }
  const total = uvY.reduce((s, p) => s + p[2], 0);
  if (!(total > 0)) return 0;
  const mu = uvY.reduce((s, p) => s + (p[0] * p[2]) / total, 0);
  const mv = uvY.reduce((s, p) => s + (p[1] * p[2]) / total, 0);
  const peak = Math.max(...uvY.map((p) => p[2]));
  return Math.max(...uvY.filter((p) => p[2] > peak / 100).map((p) => Math.hypot(p[0] - mu, p[1] - mv)));
}
