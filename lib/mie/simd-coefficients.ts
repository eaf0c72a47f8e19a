// a_n, b_n with the ratios of eq. 4.88 on WebAssembly SIMD lanes (lib/mie/wasm/coefficients.wat), two orders per
// f64x2 vector: ψ_n, χ_n and D_n(mx) are computed by the same TypeScript recurrences straight into the kernel's
// memory, and the kernel repeats mieCoefficients' operations lane by lane, so the coefficients are the same to the
// bit. The ratios took half of mieCoefficients' time at x = 50,000 (four divisions an order).

import { instantiateKernel } from "./wasm/load.js";
import { riccatiBesselAndLogDerivative, logDerivativeStart } from "./riccatiBessel.js";
import type { MieCoefficients } from "./types.js";

interface Kernel {
  ratios(psi: number, chi: number, dRe: number, dIm: number, nTerms: number, x: number, mRe: number, mIm: number, imRe: number, imIm: number, out: number): void;
  memory: WebAssembly.Memory;
}

const PAGE_BYTES = 65536;
const kernel = instantiateKernel("coefficients", "exact") as Kernel | null;

/** Whether the WebAssembly ratios run here (WebAssembly SIMD present). */
export const simdCoefficientsAvailable = kernel !== null;

/**
 * Writes a_n, b_n (n = 1..nTerms) of m = mRe + i·mIm at size parameter x into out (arrays at least nTerms long),
 * as mieCoefficients computes them; false, with out untouched, where WebAssembly SIMD is missing.
 */
export function simdCoefficients(mRe: number, mIm: number, x: number, nTerms: number, out: MieCoefficients): boolean {
  if (kernel === null) return false;
  // Layout (f64 indices): ψ, χ, Re D, Im D for orders 0..nTerms + 1 (an odd count's last lane reads one past), then
  // a re, a im, b re, b im, each nTerms rounded up to even.
  const orders = nTerms + 2;
  const even = nTerms + (nTerms & 1);
  const outAt = 4 * orders;
  const bytes = 8 * (outAt + 4 * even);
  const have = kernel.memory.buffer.byteLength;
  if (have < bytes) kernel.memory.grow(Math.ceil((bytes - have) / PAGE_BYTES));
  const buffer = kernel.memory.buffer;
  const view = (at: number, length: number) => new Float64Array(buffer, 8 * at, length);
  const inputs = { psi: view(0, orders), chi: view(orders, orders), dRe: view(2 * orders, orders), dIm: view(3 * orders, orders) };
  const zRe = mRe * x;
  const zIm = mIm * x;
  riccatiBesselAndLogDerivative(x, zRe, zIm, nTerms, logDerivativeStart(nTerms, Math.hypot(zRe, zIm)), inputs);
  const m2 = mRe * mRe + mIm * mIm;
  // 1/m, as mieCoefficients forms it
  kernel.ratios(0, 8 * orders, 16 * orders, 24 * orders, nTerms, x, mRe, mIm, mRe / m2, -mIm / m2, 8 * outAt);
  out.aRe.set(view(outAt, nTerms));
  out.aIm.set(view(outAt + even, nTerms));
  out.bRe.set(view(outAt + 2 * even, nTerms));
  out.bIm.set(view(outAt + 3 * even, nTerms));
  return true;
}
