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

/** The built reference, or a note why there is none (no C compiler, or the build failed). */
export function buildCompiledReference(): CompiledReference | { missing: string } {
  let compiler: string;
  try {
    compiler = execFileSync("cc", ["--version"], { encoding: "utf8" }).split("\n")[0];
  } catch {
    return { missing: "no C compiler (`cc`) on this machine: the compiled reference was not run" };
  }
  const binary = join(mkdtempSync(join(tmpdir(), "antisolar-mie-ref-")), "mie-reference");
  try {
    execFileSync("cc", ["-O3", "-march=native", "-o", binary, repoPath("bench/reference/mie-reference.c"), "-lm"], { stdio: "pipe" });
  } catch (error) {
    return { missing: `\`cc -O3 -march=native\` failed (${(error as Error).message.split("\n")[0]}): the compiled reference was not run` };
  }
  return {
    compiler: `${compiler}, -O3 -march=native`,
    run({ mRe, mIm, fromDeg, toDeg, stepDeg, sizeParameters, reps }) {
      const args = [mRe, mIm, fromDeg, toDeg, stepDeg, reps, ...sizeParameters].map(String);
      const [totalMs, coefficientsMs, amplitudesMs, checksum] = execFileSync(binary, args, { encoding: "utf8" }).trim().split(/\s+/).map(Number);
      return { totalMs, coefficientsMs, amplitudesMs, checksum };
    },
  };
}
