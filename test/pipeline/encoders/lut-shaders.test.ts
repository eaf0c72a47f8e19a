// The shader snippets compile: GLSL (OpenGL 4.5 and OpenGL ES 3.0 / WebGL 2) and HLSL (Shader Model 5 syntax)
// with the Khronos reference front end, glslangValidator (Debian glslang-tools), in a small fragment shader that
// calls every sampling function.
import { describe, it, expect } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { shaderSnippets } from "../../../pipeline/encoders/lut-shaders.js";
import { programRuns, skipWithout } from "../../helpers/tools.js";
import { arcPositionDeg } from "../../../lib/view/arc-position.js";
import { directionFromAzimuthElevation } from "../../../lib/view/vectors.js";

const hasGlslang = programRuns("glslangValidator", ["--version"]);

function compile(fileName: string, source: string, args: string[]): { status: number | null; output: string } {
  const dir = mkdtempSync(join(tmpdir(), "antisolar-shader-"));
  try {
    const path = join(dir, fileName);
    writeFileSync(path, source);
    // cwd: the SPIR-V that -V writes (frag.spv) lands in the temporary directory, not in the repository.
    const run = spawnSync("glslangValidator", [...args, path], { encoding: "utf8", cwd: dir });
    return { status: run.status, output: `${run.stdout}${run.stderr}` };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const glslMain = `
uniform sampler2D lut;
uniform sampler2DArray lutByElevation;
uniform sampler2DArray lutAlongArc;
uniform vec3 sunDir;
uniform float sunElevationDeg;
in vec3 viewDir;
out vec4 colour;
void main() {
  colour = antisolarSample(lut, viewDir, sunDir, 0.5, 30.0, 60.0, true)
         + antisolarSampleTimeOfDay(lutByElevation, viewDir, sunDir, 0.5, 30.0, 60.0, true, sunElevationDeg, 0.0, 40.0, 16.0)
         + antisolarSampleAlongArc(lutAlongArc, viewDir, sunDir, vec3(0.0, 0.0, 1.0), 0.5, 30.0, 60.0, true, 0.0, 180.0, 37.0);
}
`;

const hlslMain = `
Texture2D lut;
Texture2DArray lutByElevation;
Texture2DArray lutAlongArc;
SamplerState smp;
float3 sunDir;
float sunElevationDeg;
float4 main(float3 viewDir : TEXCOORD0) : SV_Target {
  return antisolarSample(lut, smp, viewDir, sunDir, 0.5, 30.0, 60.0, true)
       + antisolarSampleTimeOfDay(lutByElevation, smp, viewDir, sunDir, 0.5, 30.0, 60.0, true, sunElevationDeg, 0.0, 40.0, 16.0)
       + antisolarSampleAlongArc(lutAlongArc, smp, viewDir, sunDir, float3(0.0, 0.0, 1.0), 0.5, 30.0, 60.0, true, 0.0, 180.0, 37.0);
}
`;

describe("shader snippets", () => {
  it.skipIf(skipWithout(hasGlslang))("GLSL compiles as OpenGL 4.5 and as OpenGL ES 3.0 (WebGL 2)", () => {
    const desktop = compile("bow.frag", `#version 450\n${shaderSnippets.glsl}\n${glslMain}`, []);
    expect(desktop.output).not.toMatch(/ERROR/);
    expect(desktop.status).toBe(0);
    const es = compile("bow.frag", `#version 300 es\nprecision highp float;\nprecision highp sampler2DArray;\n${shaderSnippets.glsl}\n${glslMain}`, []);
    expect(es.output).not.toMatch(/ERROR/);
    expect(es.status).toBe(0);
  });

  it.skipIf(skipWithout(hasGlslang))("HLSL compiles (glslangValidator's HLSL front end, fragment stage)", () => {
    const result = compile("bow.hlsl", `${shaderSnippets.hlsl}\n${hlslMain}`, ["-D", "-S", "frag", "-e", "main", "-V"]);
    expect(result.output).not.toMatch(/ERROR/);
    expect(result.status).toBe(0);
  });

  it.skipIf(skipWithout(hasGlslang))("a broken snippet is refused, so the checks above can fail", () => {
    const broken = shaderSnippets.glsl.replace("float antisolarSlice(", "float antisolarSlice(undefinedType x, ");
    expect(compile("bow.frag", `#version 450\n${broken}\n${glslMain}`, []).status).not.toBe(0);
  });

  it("the time-of-day samplers take the slice range the manifest states", () => {
    for (const lang of ["glsl", "hlsl", "wgsl"] as const) {
      expect(shaderSnippets[lang]).toMatch(/antisolarSampleTimeOfDay/);
      expect(shaderSnippets[lang]).toMatch(/elevFromDeg, elevToDeg and slices come/);
      expect(shaderSnippets[lang]).toMatch(/antisolarSampleAlongArc/);
      expect(shaderSnippets[lang]).toMatch(/arcFromDeg, arcToDeg and slices come/);
    }
  });

  it("the snippets' arc position is lib/view/arc-position.ts's: the GLSL formula, transliterated line by line, agrees", () => {
    // The GLSL body of antisolarArcDeg, run here in double precision on rays all round the bow and several suns.
    const glsl = shaderSnippets.glsl;
    expect(glsl).toMatch(/vec3 t = upDir - dot\(upDir, a\) \* a;/);
    expect(glsl).toMatch(/return degrees\(atan\(abs\(dot\(d, cross\(a, t\)\)\), dot\(d, t\)\)\);/);
    const dot = (p: number[], q: number[]) => p[0] * q[0] + p[1] * q[1] + p[2] * q[2];
    const cross = (p: number[], q: number[]) => [p[1] * q[2] - p[2] * q[1], p[2] * q[0] - p[0] * q[2], p[0] * q[1] - p[1] * q[0]];
    const unit = (p: number[]) => p.map((v) => v / Math.hypot(p[0], p[1], p[2]));
    const shaderArc = (view: number[], sun: number[], up: number[]) => {
      const a = unit(sun).map((v) => -v);
      const t = unit(up.map((v, k) => v - dot(up, a) * a[k]));
      const d = unit(view);
      return (Math.atan2(Math.abs(dot(d, cross(a, t))), dot(d, t)) * 180) / Math.PI;
    };
    for (const sunElevationDeg of [0, 10, 40]) {
      const sun = directionFromAzimuthElevation(240, sunElevationDeg);
      for (let az = 0; az < 360; az += 15) {
        for (const el of [-50, -10, 0, 20, 45]) {
          const view = directionFromAzimuthElevation(az, el);
          expect(shaderArc(view, sun, [0, 0, 1])).toBeCloseTo(arcPositionDeg(view, sun.map((v) => -v)), 9);
        }
      }
    }
  });
});
