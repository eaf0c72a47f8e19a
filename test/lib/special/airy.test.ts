import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import {
  AIRY_AI_AT_ZERO,
  AIRY_AI_PRIME_AT_ZERO,
  AIRY_AI_PRIME_ZEROS,
  AIRY_AI_ZEROS,
  airyAi,
  airyAiPrime,
} from "../../../lib/special/airy.js";

// Values from Abramowitz & Stegun 1964 (§10.4, Tables 10.11 and 10.13) / DLMF §9 (listed in docs/checks.md), which
// agree with scipy.special.airy / ai_zeros to every digit shown.
const relativeOrAbsolute = (got: number, want: number, rel: number, abs: number) =>
  Math.abs(got - want) <= rel * Math.abs(want) + abs;

describe("Airy function: published values", () => {
  it("Ai(0), Ai'(0) (A&S 10.4.4, 10.4.5) to 15 digits", () => {
    expect(Math.abs(airyAi(0) - 0.355028053887817)).toBeLessThan(1e-15);
    expect(Math.abs(airyAiPrime(0) - -0.258819403792807)).toBeLessThan(1e-15);
    expect(AIRY_AI_AT_ZERO).toBeCloseTo(0.355028053887817, 15);
    expect(AIRY_AI_PRIME_AT_ZERO).toBeCloseTo(-0.258819403792807, 15);
  });

  // Table values printed to 13 significant digits: tolerance 1e-12 relative (about 1 unit of the last digit).
  const table: [number, number, number][] = [
    [-10, 4.024123848644e-2, 9.962650441328e-1],
    [-5, 3.507610090241e-1, 3.271928185544e-1],
    [-2, 2.274074282017e-1, 6.182590207417e-1],
    [-1, 5.355608832924e-1, -1.016056711665e-2],
    [0.5, 2.316936064808e-1, -2.249105326647e-1],
    [1, 1.352924163129e-1, -1.591474412968e-1],
    [2, 3.492413042327e-2, -5.309038443365e-2],
    [5, 1.083444281361e-4, -2.474138908685e-4],
  ];
  it.each(table)("x = %s: Ai = %s, Ai' = %s", (x, ai, aip) => {
    expect(relativeOrAbsolute(airyAi(x), ai, 1e-12, 0)).toBe(true);
    expect(relativeOrAbsolute(airyAiPrime(x), aip, 1e-12, 0)).toBe(true);
  });

  // Zeros printed with 10 decimals: Newton on our functions must land within 6e-11 (0.6 unit of the last digit).
  const newton = (f: (x: number) => number, df: (x: number) => number, start: number) => {
    let x = start;
    for (let i = 0; i < 30; i++) x -= f(x) / df(x);
    return x;
  };
  const aiZeros = [-2.3381074105, -4.0879494441, -5.5205598281, -6.7867080901, -7.9441335871];
  const aiPrimeAtZeros = [0.7012108227, -0.8031113697, 0.8652040259, -0.9108507370, 0.9473357094];
  const aiPrimeZeros = [-1.0187929716, -3.2481975822, -4.8200992112, -6.1633073556, -7.372177255];
  const aiAtPrimeZeros = [0.535656656, -0.419015478, 0.3804064686, -0.3579079437, 0.3423012444];
  it.each([0, 1, 2, 3, 4])("zero k = %i of Ai and Ai' (A&S Table 10.13)", (j) => {
    const a = newton(airyAi, airyAiPrime, aiZeros[j]);
    expect(Math.abs(a - aiZeros[j])).toBeLessThan(6e-11);
    expect(Math.abs(airyAiPrime(a) - aiPrimeAtZeros[j])).toBeLessThan(6e-11);
    // Ai″ = x·Ai (A&S 10.4.1) gives Newton's derivative for the zeros of Ai'.
    const ap = newton(airyAiPrime, (x) => x * airyAi(x), aiPrimeZeros[j]);
    expect(Math.abs(ap - aiPrimeZeros[j])).toBeLessThan(6e-11);
    expect(Math.abs(airyAi(ap) - aiAtPrimeZeros[j])).toBeLessThan(6e-11);
    expect(AIRY_AI_ZEROS[j]).toBe(aiZeros[j]);
    expect(AIRY_AI_PRIME_ZEROS[j]).toBe(aiPrimeZeros[j]);
  });

  it("absolute values at the published zeros stay below 1e-12 per 1e-11 of zero rounding", () => {
    // |Ai(a_k)| ≤ |Ai'(a_k)|·5e-11 (rounding of the 10-decimal zero) + 1e-12.
    for (let j = 0; j < 5; j++) {
      expect(Math.abs(airyAi(aiZeros[j]))).toBeLessThan(Math.abs(aiPrimeAtZeros[j]) * 5e-11 + 1e-12);
    }
  });

  it("maximum of Ai² is 0.2869280531 at a'_1 (A&S Table 10.13: Ai(a′₁) = 0.53565666)", () => {
    expect(Math.abs(airyAi(aiPrimeZeros[0]) ** 2 - 0.2869280531)).toBeLessThan(6e-11);
  });
});

describe("Airy function against scipy.special.airy on −200 ≤ x ≤ 20", () => {
  const reference = JSON.parse(
    readFileSync(new URL("../../../fixtures/airy/airy-reference.json", import.meta.url), "utf8"),
  ) as { x: number[]; ai: number[]; aiPrime: number[]; scipyVsMpmathMaxAbs: number };

  // Tolerance 1e-10 relative + 1e-12 absolute (our accuracy target for the Airy kernel). The reference itself is off mpmath by at most
  // the stored scipyVsMpmathMaxAbs (4e-13), inside the absolute part.
  it(`matches ${reference.x.length} points to 1e-10 relative + 1e-12 absolute`, () => {
    expect(reference.scipyVsMpmathMaxAbs).toBeLessThan(1e-12);
    let worstAi = 0;
    let worstAiPrime = 0;
    for (let j = 0; j < reference.x.length; j++) {
      const x = reference.x[j];
      const excessAi = Math.abs(airyAi(x) - reference.ai[j]) / (1e-10 * Math.abs(reference.ai[j]) + 1e-12);
      const excessAiPrime =
        Math.abs(airyAiPrime(x) - reference.aiPrime[j]) / (1e-10 * Math.abs(reference.aiPrime[j]) + 1e-12);
      worstAi = Math.max(worstAi, excessAi);
      worstAiPrime = Math.max(worstAiPrime, excessAiPrime);
    }
    expect(worstAi).toBeLessThanOrEqual(1);
    expect(worstAiPrime).toBeLessThanOrEqual(1);
  });

  it("is continuous across the switch to the asymptotic expansions at |x| = 8 (to 1e-13)", () => {
    for (const edge of [-8, 8]) {
      const below = edge - 1e-12;
      const above = edge + 1e-12;
      expect(Math.abs(airyAi(below) - airyAi(above))).toBeLessThan(1e-13 + 1e-11 * Math.abs(airyAiPrime(edge)));
      expect(Math.abs(airyAiPrime(below) - airyAiPrime(above))).toBeLessThan(1e-13 + 1e-11 * Math.abs(edge * airyAi(edge)));
    }
  });
});
