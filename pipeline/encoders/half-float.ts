/**
 * IEEE 754-2008 binary16 ("half"): 1 sign bit, 5 exponent bits (bias 15), 10 fraction bits.
 * Rounding is round-to-nearest, ties-to-even (IEEE 754-2008 §4.3.1), computed straight from the
 * double so that no intermediate binary32 rounding can double-round.
 *
 * Overflow policy (our choice): finite values beyond the largest half, 65504, are clamped to ±65504
 * instead of rounding to ±Infinity as IEEE would from 65520 up. A finite radiance sample turned into
 * Infinity poisons every later filter or average (Inf − Inf = NaN); callers who need the range write
 * "float" channels. ±Infinity stays ±Infinity; every NaN becomes the quiet NaN 0x7E00 (sign kept).
 */

const HALF_MAX = 65504; // (2 − 2^−10) · 2^15, IEEE 754-2008 Table 3.5 (binary16 emax = 15, p = 11)
const HALF_MIN_NORMAL_EXP = -14; // emin of binary16
const FRACTION_BITS = 10;
const EXPONENT_BIAS = 15;
const SIGN_BIT = 0x8000;
const INFINITY_BITS = 0x7c00;
const QUIET_NAN_BITS = 0x7e00;
const MAX_FINITE_BITS = 0x7bff;

/** 2^k for the k that scale a normal half to its significand: k = 10 − e with −14 ≤ e ≤ 15. */
const MIN_SCALE_EXPONENT = FRACTION_BITS - 15;
const POWERS_OF_TWO = Array.from({ length: 30 }, (_, i) => 2 ** (MIN_SCALE_EXPONENT + i));

/** IEEE 754 binary64 fields (sign, 11-bit exponent biased by 1023, 52-bit fraction), read through a typed-array view. */
const float64 = new Float64Array(1);
const words = new Uint32Array(float64.buffer);
const HIGH_WORD = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;

/** ⌊log2 x⌋ for a positive normal double: its unbiased exponent field. */
function binaryExponent(x: number): number {
  float64[0] = x;
  return ((words[HIGH_WORD] >>> 20) & 0x7ff) - 1023;
}

/** Nearest integer, ties to even; exact for 0 ≤ q < 2^52. */
function roundHalfEven(q: number): number {
  const floor = Math.floor(q);
  const rest = q - floor;
  if (rest > 0.5) return floor + 1;
  if (rest < 0.5) return floor;
  return floor % 2 === 0 ? floor : floor + 1;
}

export function halfBitsFromNumber(value: number): number {
  const sign = value < 0 || Object.is(value, -0) ? SIGN_BIT : 0;
  if (Number.isNaN(value)) return QUIET_NAN_BITS;
  const magnitude = Math.abs(value);
  if (magnitude === Infinity) return sign | INFINITY_BITS;
  if (magnitude === 0) return sign;
  if (magnitude >= HALF_MAX) return sign | MAX_FINITE_BITS;

  const exponent = binaryExponent(magnitude);
  if (exponent < HALF_MIN_NORMAL_EXP) {
    // Subnormal: units of 2^−24; a result of 1024 is the smallest normal, whose bits are also 0x0400.
    return sign | roundHalfEven(magnitude * 2 ** (FRACTION_BITS - HALF_MIN_NORMAL_EXP));
  }
  // Significand in units of the half ULP, in [1024, 2048]; a carry to 2048 rolls into the exponent field.
  const significand = roundHalfEven(magnitude * POWERS_OF_TWO[FRACTION_BITS - exponent - MIN_SCALE_EXPONENT]);
  return sign | (((exponent + EXPONENT_BIAS) << FRACTION_BITS) + (significand - (1 << FRACTION_BITS)));
}
