// The worker threads' warm-up: its fog-like tasks must stay shaped like a fog request's (the cell mean the planner
// chooses), or the first fog request after rain pays V8 recompiling the small-drop code again.
import { describe, it, expect } from "vitest";
import { FOG_AVERAGE, warmUpKernels } from "../../../lib/bow/warm-up.js";
import { planProfile } from "../../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../../schemas/profile.js";

describe("warmUpKernels", () => {
  it("the fog tasks average their Mie rows over the cells a 10 µm lognormal fog profile's plan does", () => {
    const plan = planProfile(profileRequestSchema.parse({ drops: { kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.4, totalNumberPerM3: 1e8 }, method: "mie", angles: { fromDeg: 20, toDeg: 60, stepDeg: 0.2 } }));
    const nearMedian = plan.quadrature.radiiUm.findIndex((r) => r >= 10);
    expect(plan.averages[nearMedian]).toEqual(FOG_AVERAGE);
  });

  it("runs the rounds asked for, rain-like and fog-like in turn, then a flattened drop twice, and reports each one's time", () => {
    const times = warmUpKernels(8);
    expect(times).toHaveLength(8);
    for (const ms of times) expect(ms).toBeGreaterThan(0);
  });
});
