// Fog is served by Lorenz–Mie rows, which ripple in drop size (resonance spacing ≈ 0.82 in size parameter at
// m = 1.333: Chýlek 1976, J. Opt. Soc. Am. 66, 285, from memory). The default 64 radius nodes per decade alias that
// ripple; "auto" averages each Mie node's row over its radius cell (lib/bow/cell-average.ts). Checked here against
// dense single-size nodes, the plain midpoint rule in ln r with the ripple resolved. Colour differences are CIEDE2000
// (Luo, Cui & Rigg 2001); ΔE ≈ 1 is about a just-noticeable difference (common practice).
import { describe, it, expect } from "vitest";
import { profileOf } from "../../helpers/profile.js";
import { deltaE2000 } from "../../../lib/colour/delta-e.js";
import { chooseRadiusDensity, rippleDensity } from "../../../lib/bow/radius-density.js";
import { cellSampleRadiusUm, rowVariant } from "../../../lib/bow/cell-average.js";
import { kernelRows } from "../../../lib/bow/kernel-rows.js";
import { latticeRadiusQuadrature } from "../../../lib/drops/lattice-quadrature.js";
import { engineChooser } from "../../../lib/bow/engine-choice.js";
import type { ProfileResult } from "../../../pipeline/compute/profile.js";
import { scenarioSentence } from "../../../lib/figures/figure-input.js";
import { computeProfile } from "../../../pipeline/compute/profile.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { ClientError } from "../../../pipeline/requests/client-error.js";

const stats = (a: ProfileResult, b: ProfileResult) => {
  const d = deltaE2000(a.colour.xyz, b.colour.xyz);
  return { worst: Math.max(...d), mean: d.reduce((s, v) => s + v, 0) / d.length };
};

// Fog of 5 µm median radius on a coarse grid, so that the dense reference stays cheap for the suite.
const fog = {
  drops: { kind: "lognormal", medianRadiusUm: 5, geometricSd: 1.4, totalNumberPerM3: 1e8 },
  method: "mie",
  angles: { fromDeg: 30, toDeg: 60, stepDeg: 1 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 20 },
};

describe("Mie ripple averaging over radius cells", () => {
  it("auto averages fog's ripple: against 1024 single sizes per decade, far closer than one size per node", { timeout: 120_000 }, async () => {
    const dense = await profileOf(fog, { nodesPerDecade: 1024, thinning: [] });
    const plain = await profileOf({ ...fog, mieSizesPerDecade: 64 });
    const auto = await profileOf(fog);
    const radii = auto.meta.radii as { mieSizesPerDecade: number; nodesPerDecade: number; rule: string };
    expect(radii.mieSizesPerDecade).toBe(256);
    expect(radii.nodesPerDecade).toBe(64);
    expect(radii.rule).toMatch(/^auto: 256 Lorenz–Mie sizes per decade, 0\.6\d apart in size parameter/);
    const a = stats(auto, dense);
    const p = stats(plain, dense);
    console.log(`fog 5 µm: worst/mean ΔE2000 against 1024 sizes per decade: one size per node ${p.worst.toFixed(3)}/${p.mean.toFixed(3)}, auto ${a.worst.toFixed(3)}/${a.mean.toFixed(3)}`);
    // Measured: one size per node 3.39/1.68, auto (256) 1.32/0.52; 512 gives 0.44/0.16 (as mieSizesPerDecade).
    expect(p.worst).toBeGreaterThan(2.5);
    expect(a.worst).toBeLessThan(1.5);
    expect(a.mean).toBeLessThan(0.6);
    expect(a.mean).toBeLessThan(p.mean / 3);
    // Figures say so in their caption (lib/figures/figure-input.ts); one size per node says nothing.
    expect(scenarioSentence(auto.request, auto.meta)).toContain(", Mie rows averaged over 256 sizes per decade)");
    expect(scenarioSentence(plain.request, plain.meta)).not.toContain("averaged");
  });

  it("auto's choice is the request's own, whatever the server's limit: over it, a 422 that names the knob", async () => {
    // Otherwise one content hash would stand for different colours on servers with different MAX_PROFILE_TERM_ANGLES.
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 26, compute: createInlinePool().compute });
    const refused = await computeProfile(profileRequestSchema.parse(fog), { kernels, limits: { maxTermAngles: 1.5e8 } }).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(ClientError);
    const error = refused as ClientError;
    expect(error.code).toBe("too-costly");
    expect(error.details.cost as number).toBeGreaterThan(2e8);
    expect(error.message).toMatch(/mieSizesPerDecade, now 256/);
  });

  it("a cell's mean row is the mean of the single-size rows at its sizes, and cached apart from them", () => {
    const medium = { wavelengthNm: 550, mRe: 1.3335, mIm: 1e-9, nAir: 1.000277 };
    const average = { samples: 4, widthLn: Math.LN10 / 64 };
    const radiusUm = 8;
    const sizes = Array.from({ length: 4 }, (_, s) => cellSampleRadiusUm(radiusUm, average, s));
    // Midpoints of four equal steps in ln r across the cell, centred on the node.
    expect(Math.log(sizes[0] / radiusUm)).toBeCloseTo((-3 / 8) * average.widthLn, 12);
    expect(Math.log(sizes[3] / radiusUm)).toBeCloseTo((3 / 8) * average.widthLn, 12);
    // At every lattice point the mean is exact to rounding. On sub-lattices (the default) the mean takes the
    // factor of the cell's largest size and a single size its own, so the two differ by the interpolation error,
    // at most 2.4e-8 of a row's peak (lib/bow/mie-sub-lattice.ts): 1e-7 of the peak allowed.
    for (const mieSampling of ["lattice", "adaptive"] as const) {
      const mean = kernelRows({ medium, h: 0.05, items: [{ radiusUm, engine: "mie", blocks: [8], average }], mieSampling });
      const singles = kernelRows({ medium, h: 0.05, items: sizes.map((r) => ({ radiusUm: r, engine: "mie" as const, blocks: [8] })), mieSampling });
      const row = mean.rows[0][0];
      const peak = Math.max(...row);
      for (let k = 0; k < row.length; k++) {
        const expected = singles.rows.reduce((s, r) => s + r[0][k], 0) / 4;
        const allowed = mieSampling === "lattice" ? 1e-12 * Math.abs(expected) : 1e-7 * peak;
        expect(Math.abs(row[k] - expected)).toBeLessThanOrEqual(allowed);
      }
      if (mieSampling === "lattice") expect(mean.mieTermAngles).toBe(singles.mieTermAngles);
    }
    expect(rowVariant("mie", average)).not.toBe(rowVariant("mie", undefined));
    expect(rowVariant("mie", { samples: 1, widthLn: 0.1 })).toBe("mie");
  });

  it("auto leaves rain alone, scales with drop size, and says when the budget holds it back", () => {
    const engine = engineChooser("auto");
    const rain = latticeRadiusQuadrature({ kind: "marshall-palmer", rainRateMmPerH: 2 });
    expect(chooseRadiusDensity({ base: rain, engine, nAir: 1.000277, cost: () => 0, budgetTermAngles: 1 }).sizesPerDecade).toBe(64);
    // Δx = x ln10 / density ≈ 0.6 at the nearest density: x 29 → 128, x 72 → 256, x 142 → 512 (AUTO_MAX_DENSITY).
    expect([29, 72, 142, 2000].map(rippleDensity)).toEqual([128, 256, 512, 512]);
    const forcedRain = latticeRadiusQuadrature({ kind: "marshall-palmer", rainRateMmPerH: 2 });
    expect(chooseRadiusDensity({ base: forcedRain, engine: engineChooser("mie"), nAir: 1.000277, cost: () => 0, budgetTermAngles: Infinity }).rule).toMatch(/above the 1000 up to which/);
    const cloud = latticeRadiusQuadrature({ kind: "lognormal", medianRadiusUm: 40, geometricSd: 1.3, totalNumberPerM3: 1e6 });
    const held = chooseRadiusDensity({ base: cloud, engine, nAir: 1.000277, cost: (d) => d * 1e7, budgetTermAngles: 1.5e9 });
    expect(held.sizesPerDecade).toBe(128);
    expect(held.cappedFrom).toBe(1024);
    expect(held.rule).toMatch(/beyond the interactive budget/);
    const unbounded = chooseRadiusDensity({ base: cloud, engine, nAir: 1.000277, cost: () => 0, budgetTermAngles: Infinity });
    expect([unbounded.sizesPerDecade, unbounded.cappedFrom]).toEqual([512, 1024]);
    expect(unbounded.rule).toMatch(/beyond auto.s limit of 512/);
  });
});
