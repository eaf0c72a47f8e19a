// 8-bit quantising with ordered dithering: the threshold matrix of Bayer 1973 ("An optimum method for two-level
// rendition of continuous-tone pictures", IEEE ICC), 8 × 8, built by its recursion M_2n = [4M, 4M+2; 4M+3, 4M+1].
// Deterministic, so identical requests give identical bytes.

const ORDER = 8;

function bayerMatrix(order: number): Uint8Array {
  let m = Uint8Array.of(0);
  for (let n = 1; n < order; n *= 2) {
    const next = new Uint8Array(4 * n * n);
    for (let y = 0; y < n; y++) {
      for (let x = 0; x < n; x++) {
        const v = 4 * m[y * n + x];
        next[y * 2 * n + x] = v;
        next[y * 2 * n + x + n] = v + 2;
        next[(y + n) * 2 * n + x] = v + 3;
        next[(y + n) * 2 * n + x + n] = v + 1;
      }
    }
    m = next;
  }
  return m;
}

const BAYER = bayerMatrix(ORDER);

/** Threshold in (0, 1) for pixel (x, y): (M + ½)/64, centred so that the mean rounding error is zero. */
export function bayerThreshold(x: number, y: number): number {
  return (BAYER[(y % ORDER) * ORDER + (x % ORDER)] + 0.5) / (ORDER * ORDER);
}

/** floor(v·255 + threshold) of v clamped to [0, 1]: a code within one step of v·255, exact on average. */
export function ditheredCode8(value: number, x: number, y: number): number {
  const v = value < 0 ? 0 : value > 1 ? 1 : value;
  return Math.min(255, Math.floor(v * 255 + bayerThreshold(x, y)));
}
