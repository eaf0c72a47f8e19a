// Instantiates a kernel of lib/mie/wasm/modules.generated.ts in one of its two arithmetics: "exact" (every product
// rounded, as the scalar TypeScript kernel) or "fused" (relaxed SIMD f64x2.relaxed_madd, which may fuse a·b + c
// into one rounding: WebAssembly relaxed SIMD proposal, 2023). Fused runs where the runtime offers relaxed SIMD:
// Node ≥ 22 by default, Node 20 started with --experimental-wasm-relaxed-simd.

import { wasmModules } from "./modules.generated.js";
import { decodeWasm } from "./decode.js";

export type WasmArithmetic = "exact" | "fused";
type KernelName = keyof typeof wasmModules;

/** Whether this runtime validates the fused variant of a kernel (relaxed SIMD present). */
export function fusedAvailable(name: KernelName): boolean {
  const fused = wasmModules[name].fused;
  try {
    return fused !== null && WebAssembly.validate(decodeWasm(fused));
  } catch {
    return false;
  }
}

/** The arithmetic the kernels use by default here: fused where available, else exact. */
export function preferredArithmetic(): WasmArithmetic {
  return fusedAvailable("amplitudes") && fusedAvailable("many-drops") ? "fused" : "exact";
}

/** The kernel's exports, or null where WebAssembly SIMD (or, for "fused", relaxed SIMD) is missing. */
export function instantiateKernel(name: KernelName, arithmetic: WasmArithmetic): WebAssembly.Exports | null {
  const bytes = arithmetic === "fused" ? wasmModules[name].fused : wasmModules[name].exact;
  if (bytes === null) return null;
  try {
    return new WebAssembly.Instance(new WebAssembly.Module(decodeWasm(bytes))).exports;
  } catch {
    return null;
  }
}
