// Shader snippets that sample an antisolar lookup texture by the angle between the view ray and the anti-sun
// direction. The u mapping mirrors lib/lut/texel-mapping.ts exactly (the tests compare them).

import { BOW_WEIGHTED_CENTRE_DEG, BOW_WEIGHTED_SCALE_DEG } from "../../lib/lut/texel-mapping.js";

const c = BOW_WEIGHTED_CENTRE_DEG.toFixed(4);
const s = BOW_WEIGHTED_SCALE_DEG.toFixed(4);

const usage = (comment: string) => `${comment} antisolar lookup texture: x = angle ψ from the antisolar point, y = drop size (see the manifest).
${comment} RGB = bow radiance (linear, Y in cd/m² unless you rescale), A = 1 − transmittance of the rain curtain.
${comment} Blend, either:
${comment}   additive radiance:      color = background + exposure * texel.rgb
${comment}   premultiplied over:     color = exposure * texel.rgb + (1.0 - texel.a) * background
${comment} psiFromDeg/psiToDeg and bowWeighted come from the manifest's u axis; sizeV = (row + 0.5) / height.
${comment} Eye safety: never look at the sun, directly or through optics, when matching a plate shot near the sun.`;

export const shaderSnippets: Record<"glsl" | "hlsl" | "wgsl", string> = {
  glsl: `${usage("//")}
const float ANTISOLAR_C = ${c};
const float ANTISOLAR_S = ${s};

float antisolarAsinh(float x) { return log(x + sqrt(x * x + 1.0)); }

// u texture coordinate of the angle psiDeg (degrees).
float antisolarU(float psiDeg, float psiFromDeg, float psiToDeg, bool bowWeighted) {
  if (!bowWeighted) return (psiDeg - psiFromDeg) / (psiToDeg - psiFromDeg);
  float a0 = antisolarAsinh((psiFromDeg - ANTISOLAR_C) / ANTISOLAR_S);
  float a1 = antisolarAsinh((psiToDeg - ANTISOLAR_C) / ANTISOLAR_S);
  return (antisolarAsinh((psiDeg - ANTISOLAR_C) / ANTISOLAR_S) - a0) / (a1 - a0);
}

// viewDir: from the eye into the scene; sunDir: from the scene towards the sun. Both world space.
vec4 antisolarSample(sampler2D lut, vec3 viewDir, vec3 sunDir, float sizeV,
                     float psiFromDeg, float psiToDeg, bool bowWeighted) {
  float cosPsi = clamp(dot(normalize(viewDir), -normalize(sunDir)), -1.0, 1.0);
  float psiDeg = degrees(acos(cosPsi));
  float u = antisolarU(psiDeg, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return vec4(0.0);
  return texture(lut, vec2(u, sizeV));
}
`,
  hlsl: `${usage("//")}
static const float ANTISOLAR_C = ${c};
static const float ANTISOLAR_S = ${s};

float antisolarAsinh(float x) { return log(x + sqrt(x * x + 1.0)); }

float antisolarU(float psiDeg, float psiFromDeg, float psiToDeg, bool bowWeighted) {
  if (!bowWeighted) return (psiDeg - psiFromDeg) / (psiToDeg - psiFromDeg);
  float a0 = antisolarAsinh((psiFromDeg - ANTISOLAR_C) / ANTISOLAR_S);
  float a1 = antisolarAsinh((psiToDeg - ANTISOLAR_C) / ANTISOLAR_S);
  return (antisolarAsinh((psiDeg - ANTISOLAR_C) / ANTISOLAR_S) - a0) / (a1 - a0);
}

// viewDir: from the eye into the scene; sunDir: from the scene towards the sun. Both world space.
float4 antisolarSample(Texture2D lut, SamplerState smp, float3 viewDir, float3 sunDir, float sizeV,
                       float psiFromDeg, float psiToDeg, bool bowWeighted) {
  float cosPsi = clamp(dot(normalize(viewDir), -normalize(sunDir)), -1.0, 1.0);
  float psiDeg = degrees(acos(cosPsi));
  float u = antisolarU(psiDeg, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return float4(0.0, 0.0, 0.0, 0.0);
  return lut.SampleLevel(smp, float2(u, sizeV), 0);
}
`,
  wgsl: `${usage("//")}
const ANTISOLAR_C: f32 = ${c};
const ANTISOLAR_S: f32 = ${s};

fn antisolarU(psiDeg: f32, psiFromDeg: f32, psiToDeg: f32, bowWeighted: bool) -> f32 {
  if (!bowWeighted) { return (psiDeg - psiFromDeg) / (psiToDeg - psiFromDeg); }
  let a0 = asinh((psiFromDeg - ANTISOLAR_C) / ANTISOLAR_S);
  let a1 = asinh((psiToDeg - ANTISOLAR_C) / ANTISOLAR_S);
  return (asinh((psiDeg - ANTISOLAR_C) / ANTISOLAR_S) - a0) / (a1 - a0);
}

// viewDir: from the eye into the scene; sunDir: from the scene towards the sun. Both world space.
fn antisolarSample(lut: texture_2d<f32>, smp: sampler, viewDir: vec3<f32>, sunDir: vec3<f32>, sizeV: f32,
                   psiFromDeg: f32, psiToDeg: f32, bowWeighted: bool) -> vec4<f32> {
  let cosPsi = clamp(dot(normalize(viewDir), -normalize(sunDir)), -1.0, 1.0);
  let psiDeg = degrees(acos(cosPsi));
  let u = antisolarU(psiDeg, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) { return vec4<f32>(0.0); }
  return textureSampleLevel(lut, smp, vec2<f32>(u, sizeV), 0.0);
}
`,
};
