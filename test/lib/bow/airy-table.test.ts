import { describe, it, expect } from "vitest";
import { readFileSync } from "node:fs";
import { airyFast, airyFastOut } from "../../../lib/bow/airy-table.js";

// The tabulated Ai, Ai′ of the Airy bins (lib/bow/airy-table.ts) against scipy.special.airy
// (fixtures/airy/make_airy_reference.py, itself checked against mpmath there).
const reference = JSON.parse(readFileSync(new URL("../../../fixtures/airy/airy-reference.json", import.meta.url), "utf8")) as {
  x: number[];
  ai: number[];
  aiPrime: number[];
};

describe("tabulated Airy function of the bow bins", () => {
  // Same tolerance as lib/special/airy.ts in test/lib/special/airy.test.ts: 1e-10 relative + 1e-12 absolute.
  it(`matches scipy at ${reference.x.length} points on −200 ≤ x ≤ 20 to 1e-10 relative + 1e-12 absolute`, () => {
    let worst = 0;
    reference.x.forEach((x, j) => {
      airyFast(x);
      worst = Math.max(
        worst,
        Math.abs(airyFastOut[0] - reference.ai[j]) / (1e-10 * Math.abs(reference.ai[j]) + 1e-12),
        Math.abs(airyFastOut[1] - reference.aiPrime[j]) / (1e-10 * Math.abs(reference.aiPrime[j]) + 1e-12),
      );
    });
    expect(worst).toBeLessThanOrEqual(1);
  });

  // Where the table hands over to the expansions (−32 and 16) a jump would show as a step in the bins' means.
  it("is continuous across its switches at −32 and 16 (to 1e-13 plus 1e-11 of the slope)", () => {
    for (const edge of [-32, 16]) {
      airyFast(edge - 1e-12);
      const [ai, aiPrime] = airyFastOut;
      airyFast(edge + 1e-12);
      expect(Math.abs(airyFastOut[0] - ai)).toBeLessThan(1e-13 + 1e-11 * Math.abs(aiPrime));
      expect(Math.abs(airyFastOut[1] - aiPrime)).toBeLessThan(1e-13 + 1e-11 * Math.abs(edge * ai));
    }
  });
});
