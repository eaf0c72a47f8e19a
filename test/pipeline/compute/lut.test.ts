// Lookup textures: texel-to-angle mapping, agreement with the profile, files the OpenEXR tools accept.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import request from "supertest";
import sharp from "sharp";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../../http/app.js";
import { programRuns, skipWithout } from "../../helpers/tools.js";
import { angleAtU, uAtAngle, texelAngles } from "../../../lib/lut/texel-mapping.js";
import { shaderSnippets } from "../../../pipeline/encoders/lut-shaders.js";

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
  angles: { fromDeg: 36, toDeg: 56, texels: 64, mapping: "bow-weighted" },
  sizes: { kind: "rain-rate", fromMmPerH: 1, toMmPerH: 20, texels: 3 },
  scenario: { spectral: { fromNm: 380, toNm: 780, stepNm: 20 } },
};

describe("texel mapping", () => {
  it.each(["linear", "bow-weighted"] as const)("%s: u(ψ(u)) = u and texel centres are ascending", (mapping) => {
    const axis = { fromDeg: 30, toDeg: 60, texels: 128, mapping };
    for (const u of [0, 0.1, 0.37, 0.5, 0.9, 1]) expect(uAtAngle(axis, angleAtU(axis, u))).toBeCloseTo(u, 12);
    const psi = texelAngles(axis);
    for (let i = 1; i < psi.length; i++) expect(psi[i]).toBeGreaterThan(psi[i - 1]);
    expect(angleAtU(axis, 0)).toBeCloseTo(30, 12);
    expect(angleAtU(axis, 1)).toBeCloseTo(60, 12);
  });

  it("bow-weighted puts more texels between the bows than linear", () => {
    const count = (mapping: "linear" | "bow-weighted") =>
      Array.from(texelAngles({ fromDeg: 30, toDeg: 60, texels: 256, mapping })).filter((p) => p > 40 && p < 54).length;
    expect(count("bow-weighted")).toBeGreaterThan(1.3 * count("linear"));
  });

  it("the shader snippets carry the same mapping constants", () => {
    for (const lang of ["glsl", "hlsl", "wgsl"] as const) {
      expect(shaderSnippets[lang]).toMatch(/46\.5000/);
      expect(shaderSnippets[lang]).toMatch(/4\.0000/);
      expect(shaderSnippets[lang]).toMatch(/premultiplied over/);
    }
  });
});

describe("POST /v1/lut", () => {
  it("a LUT sampled at the primary's angle equals the profile there", async () => {
    const manifest = (await request(app.server).post("/v1/lut?part=manifest").send(small)).body;
    expect(manifest.width).toBe(64);
    expect(manifest.height).toBe(3);
    const lut = (await request(app.server).post("/v1/lut?format=json").send(small)).body;
    const row = 1; // the middle rain rate
    const rate = manifest.v.values[row];
    const centres: number[] = manifest.u.texelCentresDeg;
    // The profile on the same physics, sampled at one texel's centre near the primary.
    const i = centres.findIndex((p) => p > 41.5);
    const psi = centres[i];
    const profile = (
      await request(app.server)
        .post("/v1/profile")
        .send({
          drops: { kind: "marshall-palmer", rainRateMmPerH: rate },
          spectral: { fromNm: 380, toNm: 780, stepNm: 20 },
          angles: { fromDeg: psi, toDeg: psi, stepDeg: 0.1 },
          output: { space: "acescg", gamut: "clip", normalise: "physical", white: "sun" },
        })
    ).body;
    const texel = lut.texels[row][i];
    for (let c = 0; c < 3; c++) {
      // 2 %: the LUT interpolates linearly between profile samples ≤ half a texel apart; the kernel lattice is shared.
      expect(Math.abs(texel[c] - profile.rgb[0][c])).toBeLessThan(0.02 * Math.max(...profile.rgb[0]) + 1e-9);
    }
    expect(texel[3]).toBeGreaterThan(0);
    expect(texel[3]).toBeLessThan(1);
  });

  // Skipped where exrheader is missing (apt-get install openexr); CI installs it, so there a missing one fails.
  it.skipIf(skipWithout(programRuns("exrheader", ["-h"])))("EXR files pass the OpenEXR tools with RGBA and the ACEScg chromaticities", async () => {
    const res = await binary(request(app.server).post("/v1/lut?format=exr").send(small));
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("image/x-exr");
    const dir = mkdtempSync(join(tmpdir(), "antisolar-lut-"));
    try {
      const file = join(dir, "lut.exr");
      writeFileSync(file, res.body as Buffer);
      const header = execFileSync("exrheader", [file], { encoding: "utf8" });
      // The content hash under the one attribute name every EXR of the service uses (views too).
      expect(header).toContain(`antisolar:hash (type string): "${res.headers["x-antisolar-hash"]}"`);
      const channels = [...header.matchAll(/^\s+([RGBA]), 16-bit floating-point/gm)].map((m) => m[1]);
      expect(channels).toEqual(["A", "B", "G", "R"]);
      // ACES AP1 red primary (0.713, 0.293) and ACES white (0.32168, 0.33767) (Academy S-2014-004).
      const xy = (label: string) => header.match(new RegExp(`^\\s+${label}\\s+\\(([-\\d.e]+) ([-\\d.e]+)\\)$`, "m"))!.slice(1).map(Number);
      expect(xy("red")[0]).toBeCloseTo(0.713, 3);
      expect(xy("red")[1]).toBeCloseTo(0.293, 3);
      expect(xy("white")[0]).toBeCloseTo(0.32168, 4);
      expect(xy("white")[1]).toBeCloseTo(0.33767, 4);
      expect(header).toContain("dataWindow (type box2i): (0 0) - (63 2)");
      execFileSync("exrinfo", ["-s", file]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("png16 decodes with alpha, and hdr starts with the Radiance header", async () => {
    const png = await binary(request(app.server).post("/v1/lut?format=png16").send(small));
    const meta = await sharp(png.body as Buffer).metadata();
    expect(meta.width).toBe(64);
    expect(meta.height).toBe(3);
    expect(meta.channels).toBe(4);
    expect(meta.depth).toBe("ushort");
    const hdr = await binary(request(app.server).post("/v1/lut?format=hdr").send(small));
    expect((hdr.body as Buffer).subarray(0, 10).toString()).toBe("#?RADIANCE");
  });

  it("GET /v1/lut/shader serves each language; a bad language is a 400", async () => {
    for (const lang of ["glsl", "hlsl", "wgsl"]) {
      const res = await request(app.server).get(`/v1/lut/shader?lang=${lang}`);
      expect(res.status).toBe(200);
      expect(res.text).toMatch(/antisolarSample/);
    }
    const bad = await request(app.server).get("/v1/lut/shader?lang=metal");
    expect(bad.status).toBe(400);
    expect(bad.body.field).toBe("lang");
  });
});
