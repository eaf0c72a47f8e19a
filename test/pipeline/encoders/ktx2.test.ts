// KTX 2.0 lookup textures, read back by a reader written from the Khronos specifications (not the writer's parser).
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import request from "supertest";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../../http/app.js";
import { readKtx2BySpec, halfToNumber, type SpecKtx2 } from "../../helpers/ktx2-spec-reader.js";

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

const small = {
  angles: { fromDeg: 38, toDeg: 54, texels: 24, mapping: "linear" },
  sizes: { kind: "rain-rate", fromMmPerH: 2, toMmPerH: 20, texels: 2 },
  scenario: { spectral: { fromNm: 380, toNm: 780, stepNm: 20 } },
  space: "acescg",
};

async function ktx2(query: string, body: object = small): Promise<{ file: SpecKtx2; headers: Record<string, string> }> {
  const res = await binary(request(app.server).post(`/v1/lut?format=ktx2${query}`).send(body));
  expect(res.status).toBe(200);
  expect(res.headers["content-type"]).toBe("image/ktx2");
  return { file: readKtx2BySpec(new Uint8Array(res.body as Buffer)), headers: res.headers as Record<string, string> };
}

async function jsonTexels(body: object = small): Promise<number[][][]> {
  const res = await request(app.server).post("/v1/lut?format=json").send(body);
  expect(res.status).toBe(200);
  return res.body.texels;
}

describe("POST /v1/lut?format=ktx2", () => {
  it("writes RGBA16F by default with a descriptor that states RGBSDA, AP1 primaries, linear transfer and premultiplied alpha", async () => {
    const { file, headers } = await ktx2("");
    // VkFormat values from the Vulkan specification's VkFormat enumeration: R16G16B16A16_SFLOAT = 97.
    expect(file.vkFormat).toBe(97);
    expect(file.typeSize).toBe(2);
    expect([file.pixelWidth, file.pixelHeight, file.pixelDepth, file.layerCount, file.faceCount, file.levelCount]).toEqual([24, 2, 0, 0, 1, 1]);
    expect(file.supercompressionScheme).toBe(0);
    // Khronos Data Format Specification 1.3: vendor Khronos (0), basic descriptor (0), version 2; block = 24 + 16 per sample.
    expect([file.dfd.vendorId, file.dfd.descriptorType, file.dfd.versionNumber, file.dfd.descriptorBlockSize]).toEqual([0, 0, 2, 24 + 4 * 16]);
    // KHR_DF_MODEL_RGBSDA = 1; KHR_DF_PRIMARIES_ACESCC = 7 (the AP1 primaries ACEScg uses); KHR_DF_TRANSFER_LINEAR = 1;
    // KHR_DF_FLAG_ALPHA_PREMULTIPLIED = 1.
    expect([file.dfd.colorModel, file.dfd.colorPrimaries, file.dfd.transferFunction, file.dfd.flags]).toEqual([1, 7, 1, 1]);
    expect(file.dfd.texelBlockDimension).toEqual([0, 0, 0, 0]);
    expect(file.dfd.bytesPlane).toEqual([8, 0, 0, 0, 0, 0, 0, 0]);
    // Channels R = 0, G = 1, B = 2, A = 15, each a signed float (qualifiers 0x80 | 0x40) of 16 bits; limits −1.0f and 1.0f.
    expect(file.dfd.samples.map((s) => [s.channelId, s.qualifiers, s.bitOffset, s.bitLength])).toEqual([
      [0, 0xc0, 0, 16],
      [1, 0xc0, 16, 16],
      [2, 0xc0, 32, 16],
      [15, 0xc0, 48, 16],
    ]);
    const asFloat = (bits: number) => new Float32Array(new Int32Array([bits]).buffer)[0];
    for (const s of file.dfd.samples) expect([asFloat(s.sampleLower), asFloat(s.sampleUpper)]).toEqual([-1, 1]);
    // Key/value data: sorted by key (KTX 2.0, "Key/Value Data"); orientation "rd" puts row 0 at the top.
    const keys = file.keyValues.map(([k]) => k);
    expect(keys).toEqual([...keys].sort());
    const kv = Object.fromEntries(file.keyValues);
    expect(kv.KTXorientation).toBe("rd");
    expect(kv["antisolar.hash"]).toBe(headers["x-antisolar-hash"]);
    expect(kv["antisolar.space"]).toBe("acescg");
    expect(JSON.parse(kv["antisolar.mapping"]).u.mapping).toBe("linear");
    // Level 0 holds every texel, 8 bytes each, at an offset aligned to 8 (the texel size; KTX 2.0, "Level Index").
    const level = file.levels[0];
    expect(level.byteLength).toBe(24 * 2 * 8);
    expect(level.uncompressedByteLength).toBe(level.byteLength);
    expect(level.byteOffset % 8).toBe(0);
  });

  it("holds the same texels as the JSON texture: exactly as RGBA32F, to half precision as RGBA16F", async () => {
    const texels = (await jsonTexels()).flat(2);
    const float = (await ktx2("&pixelType=float")).file;
    expect(float.vkFormat).toBe(109); // VK_FORMAT_R32G32B32A32_SFLOAT
    expect(float.dfd.samples.map((s) => s.bitLength)).toEqual([32, 32, 32, 32]);
    const f32 = new DataView(float.levels[0].data.buffer, float.levels[0].data.byteOffset, float.levels[0].data.byteLength);
    expect(Array.from({ length: texels.length }, (_, i) => f32.getFloat32(4 * i, true))).toEqual(texels);

    const half = (await ktx2("")).file.levels[0].data;
    const h16 = new DataView(half.buffer, half.byteOffset, half.byteLength);
    let peak = 0;
    for (const v of texels) peak = Math.max(peak, Math.abs(v));
    expect(peak).toBeGreaterThan(0);
    for (let i = 0; i < texels.length; i++) {
      const decoded = halfToNumber(h16.getUint16(2 * i, true));
      // Round to nearest binary16: relative error ≤ 2^−11 for normal values (IEEE 754-2008, p = 11); absolute
      // 2^−25 below the smallest normal, 2^−14.
      expect(Math.abs(decoded - texels[i])).toBeLessThanOrEqual(Math.max(Math.abs(texels[i]) * 2 ** -11, 2 ** -25));
    }
  });

  it("states the primaries of each linear space: BT.709 for srgb-linear, CIE XYZ for xyz-d65", async () => {
    expect((await ktx2("", { ...small, space: "srgb-linear" })).file.dfd.colorPrimaries).toBe(1);
    expect((await ktx2("", { ...small, space: "xyz-d65" })).file.dfd.colorPrimaries).toBe(5);
  });

  it("refuses a format it does not know, naming the field and the choices", async () => {
    const res = await request(app.server).post("/v1/lut?format=ktx").send(small);
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/format/);
    expect(res.body.message).toMatch(/ktx2/);
  });
});
