// Lookup textures of flattened drops: one slice per arc position. The reference is POST /v1/profile's computation at
// that arc position (computeProfile, whose physics test/pipeline/compute/flattened-profile.test.ts checks against
// published results): slice k must be that profile at the texel angles.

import { describe, expect, it } from "vitest";
import { lutRequestSchema } from "../../../schemas/lut.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { computeSlicedLut } from "../../../pipeline/compute/lut-time-of-day.js";
import { computeProfile } from "../../../pipeline/compute/profile.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { texelAngles } from "../../../lib/lut/texel-mapping.js";
import { lutManifestSchema } from "../../../schemas/responses/lut-response.js";
import type { KernelTask } from "../../../pipeline/kernels/kernel-types.js";

const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });
const deps = { kernels, limits: { maxTermAngles: Infinity } };

// One row (the scenario's 2 mm drops), two wavelengths, no canting: the flattened-drop engine is costly.
const scenario = {
  drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } },
  spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
  sun: { elevationDeg: 10 },
};
const texture = {
  scenario,
  sizes: { kind: "none" },
  space: "xyz-d65",
  angles: { fromDeg: 34, toDeg: 46, texels: 16, mapping: "linear" },
  arcPositions: { fromDeg: 0, toDeg: 90, slices: 3 },
};

describe("a lookup texture of flattened drops gains an arc-position axis", () => {
  it("slice k is the profile at arc position k (0°, 45°, 90°) at the texel angles; the manifest states the axis", async () => {
    const lut = await computeSlicedLut(lutRequestSchema.parse(texture), deps);
    expect(lut.slices).toBe(3);
    const slices = lut.manifest.slices!;
    expect(slices).toMatchObject({ fromDeg: 0, toDeg: 90, count: 3, valuesDeg: [0, 45, 90] });
    expect(slices.quantity).toMatch(/arc position/);
    expect(slices.mapping).toMatch(/antisolarArcDeg/);
    expect(lutManifestSchema.safeParse(JSON.parse(JSON.stringify(lut.manifest))).error).toBeUndefined();
    const psi = texelAngles({ fromDeg: 34, toDeg: 46, texels: 16, mapping: "linear" });
    expect(psi).toHaveLength(16);
    // The texture's profile grid (pipeline/compute/lut.ts): the finest texel spacing halved, capped at 0.1°, padded by a step.
    const step = 0.1;
    for (const [k, arcPositionDeg] of [0, 45, 90].entries()) {
      const profile = await computeProfile(
        profileRequestSchema.parse({
          ...scenario,
          arcPositionDeg,
          angles: { fromDeg: 33.9, toDeg: 33.9 + Math.ceil((46.1 - 33.9) / step) * step, stepDeg: step },
          output: { space: "xyz-d65", gamut: "clip", normalise: "physical", white: "sun" },
        }),
        deps,
      );
      const a = profile.spectral.anglesDeg;
      const peak = Math.max(...profile.colour.luminanceCdPerM2);
      for (let i = 0; i < psi.length; i++) {
        const t = (psi[i] - a[0]) / (a[1] - a[0]);
        const j = Math.floor(t);
        const y = profile.colour.rgb[3 * j + 1] * (1 - (t - j)) + profile.colour.rgb[3 * (j + 1) + 1] * (t - j);
        // Float32 texels: 1e-5 of the peak.
        expect(Math.abs(lut.rgba[4 * (k * lut.width * lut.height + i) + 1] - y)).toBeLessThan(1e-5 * peak);
      }
    }
    // The top and the side of a flattened drop's bow differ (flattened-profile.test.ts): so must their slices.
    let differs = 0;
    for (let i = 0; i < psi.length; i++) differs = Math.max(differs, Math.abs(lut.rgba[4 * i + 1] - lut.rgba[4 * (2 * lut.width + i) + 1]));
    expect(differs).toBeGreaterThan(0);
  }, 600_000);

  it("flattened drops without arcPositions get the default axis, 0°–180° every 5°; spheres refuse arc slices", () => {
    const { arcPositions: _a, ...rest } = texture;
    expect(lutRequestSchema.parse(rest).arcPositions).toBeUndefined();
    expect(() => lutRequestSchema.parse({ ...texture, scenario: { ...scenario, drops: { ...scenario.drops, shape: { kind: "sphere" } } } })).toThrow(/arcPositions|arc-position/);
    expect(() => lutRequestSchema.parse({ ...texture, arcPositions: undefined, sunElevations: { fromDeg: 0, toDeg: 10, slices: 2 } })).toThrow(/one slice axis/);
  });
});

describe("a lookup texture of large canted drops along the arc", () => {
  it("computes the canting mean by rotation once, at the first slice, for every slice (sibling-arcs.ts)", async () => {
    const seen: KernelTask[] = [];
    const inline = createInlinePool().compute;
    const counting = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: async (task, signal) => (seen.push(task), inline(task, signal)) });
    const lut = await computeSlicedLut(
      lutRequestSchema.parse({
        ...texture,
        scenario: { ...scenario, drops: { kind: "monodisperse", radiusUm: 1500, numberPerM3: 1000, shape: { kind: "equilibrium" } } },
        arcPositions: { fromDeg: 0, toDeg: 10, slices: 3 },
      }),
      { kernels: counting, limits: { maxTermAngles: Infinity } },
    );
    expect(lut.slices).toBe(3);
    const rotated = seen.filter((task) => task.items.some((item) => item.shape?.cantingRotation));
    expect(rotated.length).toBeGreaterThan(0);
    expect(new Set(rotated.map((task) => task.items[0].shape!.arcPositionDeg))).toEqual(new Set([0]));
    expect(rotated[0].items[0].shape!.siblingArcsDeg).toEqual([0, 5, 10]);
  }, 300_000);
});
