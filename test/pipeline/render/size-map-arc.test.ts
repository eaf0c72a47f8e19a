// The figure of colour against angle and drop size, for flattened drops at a chosen place on the bow. The reference
// is POST /v1/profile's computation at that arc position (computeProfile), checked against published results in
// test/pipeline/compute/flattened-profile.test.ts; here: that the map's rows are those profiles and that the
// caption says where on the bow the map was taken.

import { describe, expect, it } from "vitest";
import sharp from "sharp";
import { sizeMapRequestSchema, sizeMapRowRequest } from "../../../schemas/figures.js";
import { renderSizeMap } from "../../../pipeline/render/figure-render.js";
import { computeProfile } from "../../../pipeline/compute/profile.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { logSpacedRadii } from "../../../lib/figures/size-map-figure.js";

const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });
const deps = { kernels, maxTermAngles: Infinity };

// Two rows of large drops, two wavelengths, no canting: the flattened-drop engine is costly (lib/bow/shaped-rows.ts).
const map = {
  radiusFromUm: 1000,
  radiusToUm: 1100,
  radiusSteps: 2,
  shape: { kind: "equilibrium", cantingSdDeg: 0 },
  spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
  angles: { fromDeg: 30, toDeg: 46, stepDeg: 0.25 },
  sun: { elevationDeg: 10 },
};

async function rows(body: object): Promise<{ pixels: Buffer; width: number }> {
  const png = await renderSizeMap(sizeMapRequestSchema.parse(body), "png", deps);
  const { data, info } = await sharp(png.body).raw().toBuffer({ resolveWithObject: true });
  return { pixels: data, width: info.width };
}

describe("size map of flattened drops at an arc position", () => {
  it("each row is the profile of its drop size at that arc position (8-bit sRGB), and the top differs from the side", async () => {
    const request = sizeMapRequestSchema.parse({ ...map, arcPositionDeg: 0 });
    const top = await rows(request);
    const side = await rows({ ...map, arcPositionDeg: 90 });
    const radii = logSpacedRadii(map.radiusFromUm, map.radiusToUm, map.radiusSteps);
    let differ = 0;
    for (let r = 0; r < radii.length; r++) {
      const profile = await computeProfile(sizeMapRowRequest(request, radii[r]), { kernels, limits: { maxTermAngles: Infinity } });
      // Largest radius on the top row of the PNG.
      const row = radii.length - 1 - r;
      for (let k = 0; k < top.width * 3; k++) {
        const expected = Math.round(Math.min(1, Math.max(0, profile.colour.rgb[k])) * 255);
        expect(top.pixels[row * top.width * 3 + k]).toBe(expected);
        differ = Math.max(differ, Math.abs(top.pixels[row * top.width * 3 + k] - side.pixels[row * top.width * 3 + k]));
      }
    }
    // The top of a flattened drop's bow lies degrees from its side (flattened-profile.test.ts): the rows must differ.
    expect(differ).toBeGreaterThan(50);
  }, 600_000);

  it("the caption says the drops are flattened and where on the bow the map is taken; spheres say nothing of it", async () => {
    const svg = (await renderSizeMap(sizeMapRequestSchema.parse({ ...map, arcPositionDeg: 0 }), "svg", deps)).body.toString("utf8");
    expect(svg).toMatch(/flattened drops: equilibrium shapes \(Beard &amp; Chuang 1987\), canting σ 0°, at arc position 0° \(top of the bow\)/);
    const { shape: _shape, ...spheres } = map;
    const plain = (await renderSizeMap(sizeMapRequestSchema.parse({ ...spheres, radiusFromUm: 100, radiusToUm: 110 }), "svg", deps)).body.toString("utf8");
    expect(plain).not.toMatch(/flattened/);
  }, 600_000);
});
