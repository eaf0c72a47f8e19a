// The compiled reference of the Mie benchmark: bench/reference/mie-reference.c built with the system's C compiler
// (`cc -O3 -march=native`) into a temporary folder, run on the same inputs as our kernels. The program times itself
// (compute only: no process start, no output), so its figures and ours measure the same thing.

import { execFileSync } from "node:child_process";
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { repoPath } from "../pipeline/config/resources.js";

export interface CompiledTiming {
  totalMs: number;
  coefficientsMs: number;
  amplitudesMs: number;
  /** Σ over drops and angles of |S1|² + |S2|², to check that both sides computed the same thing. */
  checksum: number;
}

export interface CompiledReference {
  compiler: string;
  run(input: { mRe: number; mIm: number; fromDeg: number; toDeg: number; stepDeg: number; sizeParameters: number[]; reps: number }): CompiledTiming;
}

/** What the compiler may use on this machine: all of it (AVX-512 or AVX2 lanes, fused multiply-add). */
export const NATIVE_FLAGS = ["-O3", "-march=native"];

/**
 * The instruction set WebAssembly SIMD gets on x64 under Node 20: 2 × f64 lanes (128-bit), multiply and add
 * rounded apart (no fused multiply-add without relaxed SIMD), AVX's three-operand encoding (which V8 emits). The
 * same C loop built so isolates what the wider lanes and fused multiply-add give the native build.
 */
export const SAME_WIDTH_FLAGS = [...NATIVE_FLAGS, "-mno-avx512f", "-mno-avx2", "-mno-fma", "-mprefer-vector-width=128"];

/**
 * A C program of bench/reference/ built with the system's compiler into a temporary folder: its path and the compiler's
 * name and flags, or a note why there is none (no C compiler, or the build failed).
 */
export function compileReference(source: string, flags: readonly string[]): { binary: string; compiler: string } | { missing: string } {
  let compiler: string;
  try {
    compiler = execFileSync("cc", ["--version"], { encoding: "utf8" }).split("\n")[0];
  } catch {
    return { missing: "no C compiler (`cc`) on this machine: the compiled reference was not run" };
  }
  const name = source.replace(/\.c$/, "");
  const binary = join(mkdtempSync(join(tmpdir(), `antisolar-${name}-`)), name);
  try {
    execFileSync("cc", [...flags, "-o", binary, repoPath(`bench/reference/${source}`), "-lm"], { stdio: "pipe" });
  } catch (error) {
    return { missing: `\`cc ${flags.join(" ")}\` failed (${(error as Error).message.split("\n")[0]}): the compiled reference was not run` };
  }
  return { binary, compiler: `${compiler}, ${flags.join(" ")}` };
}

/** The built reference, or a note why there is none (no C compiler, or the build failed). */
export function buildCompiledReference(flags: readonly string[] = NATIVE_FLAGS): CompiledReference | { missing: string } {
  const built = compileReference("mie-reference.c", flags);
  if ("missing" in built) return built;
  const { binary, compiler } = built;
  return {
    compiler,
    run({ mRe, mIm, fromDeg, toDeg, stepDeg, sizeParameters, reps }) {
      const args = [mRe, mIm, fromDeg, toDeg, stepDeg, reps, ...sizeParameters].map(String);
      const [totalMs, coefficientsMs, amplitudesMs, checksum] = execFileSync(binary, args, { encoding: "utf8" }).trim().split(/\s+/).map(Number);
      return { totalMs, coefficientsMs, amplitudesMs, checksum };
    },
  };
}
