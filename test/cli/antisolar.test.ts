// The baking CLI uses the same schemas and core as the service (it runs the built dist/, which npm test builds).
import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

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
});
