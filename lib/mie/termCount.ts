/**
 * Number of partial waves kept in the Lorenz–Mie series.
 * Form x + c·x^(1/3) + 2 from Wiscombe 1980 (Appl. Opt. 19, 1505, eq. for N_stop); c = 6 instead of
 * Wiscombe's 4.05 because 4.05 leaves 5e-7 relative error in |S|² near 180° at x = 3000 and 1.8e-6
 * at x = 50000 (against the mpmath reference in fixtures/mie), above the 1e-9 goal, while with 6 the
 * truncation error drops below rounding (≤ 2e-11 up to x = 50000; test/lib/mie/mpmath-reference.test.ts).
 */
export const TERM_COUNT_CUBE_ROOT_FACTOR = 6;

export function mieTermCount(x: number): number {
  return Math.ceil(x + TERM_COUNT_CUBE_ROOT_FACTOR * Math.cbrt(x) + 2);
}
