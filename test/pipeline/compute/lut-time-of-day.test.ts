// Time-of-day lookup textures: each slice is the single-elevation texture at its elevation, in every file kind.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../../http/app.js";
import { readKtx2BySpec } from "../../helpers/ktx2-spec-reader.js";
import { computeSlicedLut, sliceElevationsDeg } from "../../../pipeline/compute/lut-time-of-day.js";
import { lutRequestSchema } from "../../../schemas/lut.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import type { ProgressUpdate } from "../../../pipeline/progress/progress-meter.js";

let app: FastifyInstance;
beforeAll(async () => {
  app = await buildApp({ config: { cacheDir: "" } });
  await app.ready();
});
afterAll(async () => app.close());

const binary = (req: request.Test) =>
  req.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on("data", (c: Buffer) => chunks.push(c));
    res.on("end", () => cb(null, Buffer.concat(chunks)));
  });

const base = {
  angles: { fromDeg: 38, toDeg: 54, texels: 20, mapping: "linear" },
  sizes: { kind: "rain-rate", fromMmPerH: 2, toMmPerH: 20, texels: 2 },
  scenario: { spectral: { fromNm: 380, toNm: 780, stepNm: 20 } },
};
const sliced = { ...base, sunElevations: { fromDeg: 3, toDeg: 33, slices: 3 } };

describe("POST /v1/lut with sunElevations", () => {
  it("slice k equals the single-elevation texture at elevation k, texel for texel", async () => {
    expect(sliceElevationsDeg(sliced.sunElevations)).toEqual([3, 18, 33]);
    const res = await request(app.server).post("/v1/lut?format=json").send(sliced);
    expect(res.status).toBe(200);
    expect(res.body.slices).toHaveLength(3);
    expect(res.body.manifest.slices).toMatchObject({ fromDeg: 3, toDeg: 33, count: 3, valuesDeg: [3, 18, 33] });
    for (const [k, elevationDeg] of [3, 18, 33].entries()) {
      const single = await request(app.server)
        .post("/v1/lut?format=json")
        .send({ ...base, scenario: { ...base.scenario, sun: { elevationDeg } } });
      expect(single.status).toBe(200);
      expect(res.body.slices[k]).toEqual(single.body.texels);
      expect(res.body.manifest.slices.sliceHashes[k]).toBe(single.body.manifest.hash);
    }
    // The slices differ the way sunlight does: through more air (Kasten & Young 1989 air mass, about 13 at 3° against
    // 1.8 at 33°) the direct sun is dimmer, so the bow's brightest texel is dimmer in the 3° slice. (Its colour is
    // kept: the texture maps the sun's own light to white, as the manifest states.)
    const peakGreen = (slice: number[][][]) => Math.max(...slice.flat(1).map((texel) => texel[1]));
    expect(peakGreen(res.body.slices[0])).toBeLessThan(0.8 * peakGreen(res.body.slices[2]));
  });

  it("KTX2 holds the slices as array layers; EXR stacks them top to bottom", async () => {
    const ktx = await binary(request(app.server).post("/v1/lut?format=ktx2&pixelType=float").send(sliced));
    expect(ktx.status).toBe(200);
    const file = readKtx2BySpec(new Uint8Array(ktx.body as Buffer));
    expect([file.pixelWidth, file.pixelHeight, file.layerCount]).toEqual([20, 2, 3]);
    const json = await request(app.server).post("/v1/lut?format=json").send(sliced);
    const data = file.levels[0].data;
    const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
    // KTX 2.0, "Level Index": within a level, layer after layer, each row-major.
    const texels = (json.body.slices as number[][][][]).flat(3);
    expect(Array.from({ length: texels.length }, (_, i) => view.getFloat32(4 * i, true))).toEqual(texels);
    expect(JSON.parse(Object.fromEntries(file.keyValues)["antisolar.mapping"]).slices.count).toBe(3);

    const exr = await binary(request(app.server).post("/v1/lut?format=exr").send(sliced));
    expect(exr.status).toBe(200);
    // OpenEXR header: the dataWindow box2i attribute holds xMin, yMin, xMax, yMax (OpenEXR file layout, "Header").
    const bytes = exr.body as Buffer;
    const at = bytes.indexOf("dataWindow\0box2i\0");
    const box = at + "dataWindow\0box2i\0".length + 4;
    expect([bytes.readInt32LE(box), bytes.readInt32LE(box + 4), bytes.readInt32LE(box + 8), bytes.readInt32LE(box + 12)]).toEqual([0, 0, 19, 3 * 2 - 1]);
  });

  it("warns when the scenario's own elevation is overridden by the slices", async () => {
    const res = await request(app.server)
      .post("/v1/lut?part=manifest")
      .send({ ...sliced, scenario: { ...sliced.scenario, sun: { elevationDeg: 12 } } });
    expect(res.status).toBe(200);
    expect(res.body.warnings.join(" ")).toMatch(/scenario\.sun\.elevationDeg is replaced/);
  });

  it.each([
    [{ fromDeg: 10, toDeg: 5, slices: 4 }, /sunElevations\.toDeg.*exceed/],
    [{ fromDeg: 0, toDeg: 40, slices: 33 }, /sunElevations\.slices/],
    [{ fromDeg: -5, toDeg: 40, slices: 4 }, /sunElevations\.fromDeg/],
  ])("refuses %j with a 400 naming the field", async (sunElevations, message) => {
    const res = await request(app.server).post("/v1/lut").send({ ...base, sunElevations });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(message);
  });

  it("refuses more texels than the stated limit, naming it", async () => {
    const res = await request(app.server)
      .post("/v1/lut")
      .send({ angles: { texels: 4096 }, sizes: { kind: "radius", texels: 16 }, sunElevations: { fromDeg: 0, toDeg: 40, slices: 32 } });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/sunElevations\.slices.*1,048,576 texels/);
  });

  it("progress weighs the shared kernels and spectral sums against each slice's colour sums", async () => {
    const updates: ProgressUpdate[] = [];
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 28, compute: createInlinePool().compute });
    await computeSlicedLut(lutRequestSchema.parse(sliced), { kernels, limits: { maxTermAngles: Infinity } }, (u) => updates.push(u));
    const stages = [...new Set(updates.map((u) => u.stage))];
    expect(stages).toEqual(["kernels", "spectral", "slice 1 of 3 (sun at 3°)", "slice 2 of 3 (sun at 18°)", "slice 3 of 3 (sun at 33°)", "done"]);
    const fractions = updates.map((u) => u.fraction);
    expect(fractions.every((f, i) => i === 0 || f >= fractions[i - 1])).toBe(true);
    expect(fractions.at(-1)).toBe(1);
    // Cold, the kernels are nearly all the work and each slice only its colour sums: by the first slice the fraction
    // is far past 1/3, where weighing the slices equally would have put it.
    const firstSlice = updates.find((u) => u.stage.startsWith("slice 1"))!;
    expect(firstSlice.fraction).toBeGreaterThan(0.9);
  });
});

