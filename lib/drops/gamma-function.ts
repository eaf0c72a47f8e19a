// Lanczos approximation, g = 7, n = 9 (Lanczos 1964, SIAM J. Numer. Anal. B1, 86; coefficients as in
// Press et al., Numerical Recipes 3rd ed. §6.1 and widely reproduced), relative error ≈ 1e-15.
const G = 7;
const COEFFICIENTS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

export function logGamma(x: number): number {
  if (!(x > 0)) throw new RangeError("logGamma needs x > 0");
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let a = COEFFICIENTS[0];
  const t = z + G + 0.5;
  for (let i = 1; i < COEFFICIENTS.length; i++) a += COEFFICIENTS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

export function gammaFunction(x: number): number {
  return Math.exp(logGamma(x));
}
