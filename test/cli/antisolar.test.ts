// The baking CLI uses the same schemas and core as the service (it runs the built dist/, which npm test builds).
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { channelsOf, parseHeader } from "../helpers/exr-reader.js";

const cli = fileURLToPath(new URL("../../dist/cli/antisolar.js", import.meta.url));

function run(args: string[], cacheDir: string): { stdout: string; status: number; stderr: string } {
  try {
    const stdout = execFileSync(process.execPath, [cli, ...args], { encoding: "utf8", stdio: ["ignore", "pipe", "pipe"], env: { ...process.env, CACHE_DIR: cacheDir, WORKERS: "1" } });
    return { stdout, status: 0, stderr: "" };
  } catch (error) {
    const e = error as { status: number; stdout: string; stderr: string };
    return { stdout: e.stdout, status: e.status, stderr: e.stderr };
  }
}

describe("antisolar CLI", () => {
  it("bakes a LUT to EXR with its manifest, and renders a profile to JSON", () => {
    const dir = mkdtempSync(join(tmpdir(), "antisolar-cli-"));
    try {
      const request = join(dir, "lut.json");
      writeFileSync(request, JSON.stringify({ sizes: { kind: "rain-rate", texels: 2 }, angles: { texels: 32 }, scenario: { spectral: { fromNm: 380, toNm: 780, stepNm: 20 } } }));
      const out = join(dir, "bow.exr");
      const baked = run(["bake", request, "-o", out], join(dir, "cache"));
      expect(baked.status).toBe(0);
      const exr = readFileSync(out);
      expect(exr.readUInt32LE(0)).toBe(20000630); // OpenEXR magic number (OpenEXR file layout)
      const manifest = JSON.parse(readFileSync(`${out}.manifest.json`, "utf8"));
      expect(manifest.width).toBe(32);
      expect(manifest.height).toBe(2);
      expect(manifest.u.texelCentresDeg).toHaveLength(32);

      const profileRequest = join(dir, "profile.json");
      writeFileSync(profileRequest, JSON.stringify({ spectral: { fromNm: 380, toNm: 780, stepNm: 20 } }));
      const rendered = run(["render", profileRequest, "-o", join(dir, "bow.json")], join(dir, "cache"));
      expect(rendered.status).toBe(0);
      const profile = JSON.parse(readFileSync(join(dir, "bow.json"), "utf8"));
      expect(profile.bows.primaryDeg).toBeGreaterThan(40);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("bakes a texture by scattering order (--layers by-order) as the route does, and refuses layers with KTX2 (exit 1)", async () => {
    const dir = mkdtempSync(join(tmpdir(), "antisolar-cli-"));
    try {
      const body = { sizes: { kind: "radius", texels: 2, fromUm: 300, toUm: 600 }, angles: { texels: 16 }, scenario: { method: "airy", spectral: { fromNm: 380, toNm: 780, stepNm: 20 } } };
      const request = join(dir, "lut.json");
      writeFileSync(request, JSON.stringify(body));
      const out = join(dir, "layers.exr");
      expect(run(["bake", request, "-o", out, "--layers", "by-order"], join(dir, "cache")).status).toBe(0);
      const file = readFileSync(out);
      const names = channelsOf(parseHeader(file).attributes.get("channels")!).map((c) => c.name);
      expect(names).toContain("primary.R");
      expect(names).toHaveLength(4 + 5 * 3);
      const app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0 } });
      try {
        const res = await app.inject({ method: "POST", url: "/v1/lut?format=exr&layers=by-order", payload: body });
        expect(res.statusCode).toBe(200);
        expect(res.rawPayload.equals(file)).toBe(true);
      } finally {
        await app.close();
      }
      const refused = run(["bake", request, "-o", join(dir, "x.ktx2"), "--layers", "by-order"], join(dir, "cache"));
      expect(refused.status).toBe(1);
      expect(refused.stderr).toMatch(/layers/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("refuses a bad request with the field and its range, exit code 1", () => {
    const dir = mkdtempSync(join(tmpdir(), "antisolar-cli-"));
    try {
      const request = join(dir, "bad.json");
      writeFileSync(request, JSON.stringify({ angles: { texels: 1 } }));
      const result = run(["bake", request, "-o", join(dir, "x.exr")], join(dir, "cache"));
      expect(result.status).toBe(1);
      expect(result.stderr).toMatch(/angles\.texels/);
      expect(result.stderr).toMatch(/2/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("renders the moon by place and time with its sourcePosition, and refuses a moment with the sun down (exit 1)", () => {
    const dir = mkdtempSync(join(tmpdir(), "antisolar-cli-"));
    try {
      // An invented lake at 61.1° N 24.6° E; the full moon of 2026-03-03 stands about 31° high at 22:00 UTC.
      const place = { latitudeDeg: 61.1, longitudeDeg: 24.6 };
      const request = join(dir, "moon.json");
      writeFileSync(request, JSON.stringify({ moon: { at: { utc: "2026-03-03T22:00:00Z", ...place } }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 }, output: { vision: "eye" } }));
      const rendered = run(["render", request, "-o", join(dir, "moon.json.out.json")], join(dir, "cache"));
      expect(rendered.status, rendered.stderr).toBe(0);
      const profile = JSON.parse(readFileSync(join(dir, "moon.json.out.json"), "utf8"));
      expect(profile.meta.sourcePosition.source).toBe("moon");
      expect(profile.meta.sourcePosition.elevationDeg).toBeGreaterThan(25);
      expect(profile.meta.vision.mode).toBe("eye");

      const night = join(dir, "night.json");
      writeFileSync(night, JSON.stringify({ sun: { at: { utc: "2026-03-03T22:00:00Z", ...place } } }));
      const refused = run(["render", night, "-o", join(dir, "night.out.json")], join(dir, "cache"));
      expect(refused.status).toBe(1);
      expect(refused.stderr).toMatch(/sun\.at\.utc/);
      expect(refused.stderr).toMatch(/below the horizon/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("renders a sequence to a tar archive of frames and a manifest", () => {
    const dir = mkdtempSync(join(tmpdir(), "antisolar-cli-"));
    try {
      // An invented hillside at 47.2° N 8.4° E on a June evening: two frames 20 minutes apart.
      const job = {
        endpoint: "profile",
        format: "png",
        body: { sun: { at: { utc: "2026-06-21T18:00:00Z", latitudeDeg: 47.2, longitudeDeg: 8.4 } }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 }, angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.5 } },
        sequence: { fromUtc: "2026-06-21T18:00:00Z", toUtc: "2026-06-21T18:20:00Z", frames: 2 },
      };
      const request = join(dir, "job.json");
      writeFileSync(request, JSON.stringify(job));
      const out = join(dir, "frames.tar");
      const result = run(["sequence", request, "-o", out], join(dir, "cache"));
      expect(result.status, result.stderr).toBe(0);
      const tar = readFileSync(out);
      // POSIX ustar: "ustar" at offset 257 of each 512-byte header; the first entry is the first frame.
      expect(tar.subarray(257, 262).toString("latin1")).toBe("ustar");
      expect(tar.subarray(0, 14).toString("latin1")).toBe("frame-0001.png");
      expect(tar.includes(Buffer.from("frame-0002.png"))).toBe(true);
      expect(tar.includes(Buffer.from("manifest.json"))).toBe(true);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

/** EXR header attributes (OpenEXR file layout: after magic and version, name\0 type\0 size value, ending with \0). */
function exrAttributes(file: Buffer): Map<string, { type: string; value: Buffer }> {
  const out = new Map<string, { type: string; value: Buffer }>();
  let at = 8;
  const text = () => {
    const end = file.indexOf(0, at);
    const s = file.toString("latin1", at, end);
    at = end + 1;
    return s;
  };
  for (;;) {
    const name = text();
    if (name === "") return out;
    const type = text();
    const size = file.readInt32LE(at);
    out.set(name, { type, value: file.subarray(at + 4, at + 4 + size) });
    at += 4 + size;
  }
}

describe("one bake: the CLI writes what the routes answer", () => {
  let app: FastifyInstance;
  let dir: string;
  beforeAll(async () => {
    app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, workers: 1, maxEventLoopDelayMs: 0 } });
    dir = mkdtempSync(join(tmpdir(), "antisolar-cli-"));
  });
  afterAll(async () => {
    await app.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it("bake: the EXR is byte for byte POST /v1/lut's, with every attribute (comments, hash, space, chromaticities)", async () => {
    const body = { sizes: { kind: "radius", texels: 2, fromUm: 50, toUm: 500 }, angles: { texels: 16 }, scenario: { spectral: { fromNm: 400, toNm: 700, stepNm: 20 } } };
    const request = join(dir, "lut.json");
    writeFileSync(request, JSON.stringify(body));
    const out = join(dir, "bow.exr");
    expect(run(["bake", request, "--output", out], join(dir, "cache")).status).toBe(0);
    const cli = readFileSync(out);
    const res = await app.inject({ method: "POST", url: "/v1/lut?format=exr", payload: body });
    expect(res.statusCode).toBe(200);
    const route = res.rawPayload;
    const cliAttributes = exrAttributes(cli);
    const routeAttributes = exrAttributes(route);
    expect([...cliAttributes.keys()].sort()).toEqual([...routeAttributes.keys()].sort());
    for (const name of ["comments", "antisolar:hash", "antisolar:space", "chromaticities"]) {
      expect(cliAttributes.get(name)?.value.equals(routeAttributes.get(name)!.value), name).toBe(true);
    }
    expect(cli.equals(route)).toBe(true);
    // The manifest beside it is the route's ?part=manifest, but for the time each took.
    const manifest = JSON.parse(readFileSync(`${out}.manifest.json`, "utf8"));
    const routeManifest = (await app.inject({ method: "POST", url: "/v1/lut?part=manifest", payload: body })).json();
    expect({ ...manifest, computeMs: 0 }).toEqual({ ...routeManifest, computeMs: 0 });
  });

  it("bake: a time-of-day texture as KTX2 is byte for byte POST /v1/lut's ?format=ktx2", async () => {
    const body = { sizes: { kind: "none" }, angles: { texels: 16 }, scenario: { spectral: { fromNm: 400, toNm: 700, stepNm: 20 } }, sunElevations: { fromDeg: 5, toDeg: 25, slices: 2 } };
    const request = join(dir, "slices.json");
    writeFileSync(request, JSON.stringify(body));
    const out = join(dir, "slices.ktx2");
    expect(run(["bake", request, "-o", out], join(dir, "cache")).status).toBe(0);
    const res = await app.inject({ method: "POST", url: "/v1/lut?format=ktx2", payload: body });
    expect(res.statusCode).toBe(200);
    expect(readFileSync(out).equals(res.rawPayload)).toBe(true);
  });

  it("render: the PNG strip is byte for byte POST /v1/profile's ?format=png16&height=32", async () => {
    const body = { angles: { fromDeg: 38, toDeg: 54, stepDeg: 0.5 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 } };
    const request = join(dir, "profile.json");
    writeFileSync(request, JSON.stringify(body));
    const out = join(dir, "strip.png");
    expect(run(["render", request, "-o", out, "--height", "32"], join(dir, "cache")).status).toBe(0);
    const res = await app.inject({ method: "POST", url: "/v1/profile?format=png16&height=32", payload: body });
    expect(res.statusCode).toBe(200);
    expect(readFileSync(out).equals(res.rawPayload)).toBe(true);
  });

  it("refuses an unknown option or output type with the usage text, exit code 1", () => {
    const unknown = run(["bake", "x.json", "-o", "x.exr", "--colour", "red"], join(dir, "cache"));
    expect(unknown.status).toBe(1);
    expect(unknown.stderr).toMatch(/--colour/);
    expect(unknown.stderr).toMatch(/antisolar bake <lut-request.json>/);
    const type = run(["bake", "x.json", "-o", "x.tiff"], join(dir, "cache"));
    expect(type.status).toBe(1);
    expect(type.stderr).toMatch(/\.tiff.*\.exr, \.ktx2, \.hdr, \.png, \.json/);
  });
});
