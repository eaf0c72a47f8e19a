import { describe, it, expect } from "vitest";
import { readFileSync } from "node:fs";
import { profileRequestSchema, type ProfileRequest } from "../../../schemas/profile.js";
import { autoChoiceFor, computeProfile } from "../../../pipeline/compute/profile.js";
import { loadPresets } from "../../../pipeline/requests/presets.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { AUTO_MEASURED_ON_PRESETS, AUTO_MIE_BUDGET_TERM_ANGLES } from "../../../lib/bow/engine-choice.js";

// auto's choice on every preset and the default profile, against the measurement of that choice in
// fixtures/auto-engine/presets-vs-mie.json (bench/auto-presets.ts --write: auto against method "mie", ψ 30–60°,
// CIEDE2000 per sample, XYZ scaled by the Mie peak Y). The full-Mie references take minutes, so they live in the
// benchmark; this test checks that the measurement still describes what auto chooses, and what meta states.
interface Measured {
  budgetTermAngles: number;
  presets: { preset: string; airyFromUm: number | null; worstDeltaE: number; meanDeltaE: number }[];
}
const measured = JSON.parse(readFileSync(new URL("../../../fixtures/auto-engine/presets-vs-mie.json", import.meta.url), "utf8")) as Measured;
const requests = new Map<string, ProfileRequest>([["default", profileRequestSchema.parse({})], ...[...loadPresets().values()].map((p) => [p.name, p.body] as [string, ProfileRequest])]);
// The accuracy goal for auto against full Mie: worst sample ΔE2000 ≤ 1.0, mean ≤ 0.3 (common practice: ΔE00 ≈ 1 is
// about a just-noticeable difference), on every preset.
const GOAL = { worst: 1.0, mean: 0.3 };

describe("cost-aware auto on every preset", () => {
  it("was measured at the service's budget, on every preset and the default profile", () => {
    expect(measured.budgetTermAngles).toBe(AUTO_MIE_BUDGET_TERM_ANGLES);
    expect(measured.presets.map((p) => p.preset).sort()).toEqual([...requests.keys()].sort());
  });

  for (const [name, request] of requests) {
    it(`${name}: auto's choice is the one measured, within the accuracy goal`, () => {
      const m = measured.presets.find((p) => p.preset === name)!;
      const choice = autoChoiceFor({ ...request, method: "auto" })!;
      if (m.airyFromUm === null) {
        expect(choice.airyFromUm).toBe(Infinity);
        expect(m.worstDeltaE).toBe(0);
      } else {
        expect(choice.airyFromUm).toBeCloseTo(m.airyFromUm, 9);
        expect(choice.rule).toContain(`worst ΔE2000 ${AUTO_MEASURED_ON_PRESETS.worstDeltaE}`);
      }
      expect(m.meanDeltaE).toBeLessThanOrEqual(GOAL.mean);
      expect(m.worstDeltaE).toBeLessThanOrEqual(GOAL.worst);
    });
  }

  it("states the worst and mean error measured over the presets (rounded up to 0.01)", () => {
    const worst = Math.max(...measured.presets.map((p) => p.worstDeltaE));
    const mean = Math.max(...measured.presets.map((p) => p.meanDeltaE));
    expect(AUTO_MEASURED_ON_PRESETS.worstDeltaE).toBe(Math.ceil(worst * 100) / 100);
    expect(AUTO_MEASURED_ON_PRESETS.meanDeltaE).toBe(Math.ceil(mean * 100) / 100);
  });

  it("where it chooses Mie for every drop (garden sprinkler), auto's profile is full Mie's to the bit", async () => {
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute: createInlinePool().compute });
    const deps = { kernels, limits: { maxTermAngles: Infinity } };
    const body = requests.get("garden-sprinkler")!;
    const auto = await computeProfile({ ...body, method: "auto" }, deps);
    const mie = await computeProfile({ ...body, method: "mie" }, deps);
    expect(auto.spectral.perpendicular).toEqual(mie.spectral.perpendicular);
    expect(auto.spectral.parallel).toEqual(mie.spectral.parallel);
    expect(auto.meta.method).toMatchObject({ rule: expect.stringMatching(/exact Lorenz–Mie for every drop/) });
  });
});
