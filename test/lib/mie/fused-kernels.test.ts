import { describe, it, expect } from "vitest";
import { setFlagsFromString } from "node:v8";
import { readFileSync } from "node:fs";
import { mieCoefficients } from "../../../lib/mie/coefficients.js";
import { mieCoefficientsScratch } from "../../../lib/mie/coefficients-scratch.js";
import { createSimdAmplitudes } from "../../../lib/mie/simd-amplitudes.js";
import { createManyDrops } from "../../../lib/mie/many-drops.js";
import { fusedAvailable, preferredArithmetic } from "../../../lib/mie/wasm/load.js";
import { allocateAmplitudes, type MieAmplitudes } from "../../../lib/mie/types.js";

// The kernels' fused arithmetic (relaxed SIMD f64x2.relaxed_madd) and its fallback. Node 20 offers relaxed SIMD only
// behind --experimental-wasm-relaxed-simd, Node ≥ 22 by default; this file first checks the fallback as the process
// started, then turns the flag on (node:v8 setFlagsFromString, for this test process only) to run the fused kernels.
const ref = JSON.parse(readFileSync(new URL("../../../fixtures/mie/mie-reference.json", import.meta.url), "utf8")) as {
  cases: { label: string; perfectConductor: boolean; mRe?: number; mIm?: number; x: number; amplitudes: { angleDeg: number; s1Re: number; s1Im: number; s2Re: number; s2Im: number }[] }[];
};
// The accuracy goal for complex amplitudes relative to |S| (test/lib/mie/amplitude-kernels.test.ts), against
// fixtures/mie/make_mie_reference.py (Bohren & Huffman 1983 eqs. 4.53 and 4.74 with mpmath at 60 digits).
const REL_AMPLITUDE = 1e-9;
const nodeMajor = Number(process.versions.node.split(".")[0]);
const cosines = (anglesDeg: ArrayLike<number>) => Float64Array.from(anglesDeg, (a) => Math.cos((a * Math.PI) / 180));
const parts = ["s1Re", "s1Im", "s2Re", "s2Im"] as const;

function worstRelative(a: MieAmplitudes, b: MieAmplitudes): number {
  let worst = 0;
  for (let j = 0; j < a.s1Re.length; j++) {
    const d1 = Math.hypot(a.s1Re[j] - b.s1Re[j], a.s1Im[j] - b.s1Im[j]) / Math.hypot(b.s1Re[j], b.s1Im[j]);
    const d2 = Math.hypot(a.s2Re[j] - b.s2Re[j], a.s2Im[j] - b.s2Im[j]) / Math.hypot(b.s2Re[j], b.s2Im[j]);
    worst = Math.max(worst, d1, d2);
  }
  return worst;
}

describe("fused multiply-add kernels (relaxed SIMD) and their fallback", () => {
  it.skipIf(nodeMajor >= 22)("without relaxed SIMD (Node 20 as started) the fused kernels are refused and exact arithmetic runs", () => {
    expect(fusedAvailable("amplitudes")).toBe(false);
    expect(preferredArithmetic()).toBe("exact");
    expect(createSimdAmplitudes("fused")).toBeNull();
    expect(createManyDrops("fused")).toBeNull();
    expect(createSimdAmplitudes("exact")).not.toBeNull();
  });

  it("with relaxed SIMD on, the fused kernels run and stay within the reference tolerance of the mpmath amplitudes", () => {
    setFlagsFromString("--experimental-wasm-relaxed-simd");
    expect(preferredArithmetic()).toBe("fused");
    const fused = createSimdAmplitudes("fused")!;
    expect(fused).not.toBeNull();
    for (const c of ref.cases.filter((r) => !r.perfectConductor)) {
      const got = fused(mieCoefficients(c.mRe!, c.mIm!, c.x), cosines(c.amplitudes.map((r) => r.angleDeg)), allocateAmplitudes(c.amplitudes.length))!;
      const want = allocateAmplitudes(c.amplitudes.length);
      c.amplitudes.forEach((r, j) => parts.forEach((p) => (want[p][j] = r[p])));
      expect(worstRelative(got, want), c.label).toBeLessThan(REL_AMPLITUDE);
    }
  });

  it("fused and exact sums agree to rounding; the fused many-drops kernel equals the fused per-call one bit for bit", () => {
    setFlagsFromString("--experimental-wasm-relaxed-simd");
    const fused = createSimdAmplitudes("fused")!;
    const exact = createSimdAmplitudes("exact")!;
    const manyFused = createManyDrops("fused")!;
    const mu = cosines(Array.from({ length: 203 }, (_, j) => 115 + 0.2 * j));
    const xs = [30, 700, 4000, 21000];
    const outs = xs.map(() => allocateAmplitudes(mu.length));
    manyFused(xs.length, (d) => mieCoefficientsScratch(1.334, 1e-8, xs[d]), mu, outs);
    xs.forEach((x, d) => {
      const c = mieCoefficients(1.334, 1e-8, x);
      const perCall = fused(c, mu, allocateAmplitudes(mu.length))!;
      for (const p of parts) expect(outs[d][p], `x = ${x}, ${p}`).toEqual(perCall[p]);
      // Each fused product skips one rounding of ~1e-16; over N terms the sums move by far less than the goal.
      expect(worstRelative(perCall, exact(c, mu, allocateAmplitudes(mu.length))!), `x = ${x}`).toBeLessThan(1e-11);
    });
  });
});
