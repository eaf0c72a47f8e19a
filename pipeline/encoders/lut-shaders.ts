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

const timeOfDayUsage = (comment: string) => `${comment} Time-of-day textures (sunElevations): slices are array layers (KTX2); elevFromDeg, elevToDeg and slices come
${comment} from the manifest's slices; the two slices nearest the sun's elevation are blended linearly. Where an engine has
${comment} no array textures, the stacked image's v of slice k is (k + sizeV) / slices.`;

const alongArcUsage = (comment: string) => `${comment} Flattened drops: slices by arc position (array layers, or stacked as above); arcFromDeg, arcToDeg and slices come from
${comment} the manifest's slices. The arc position is the angle around the antisolar point from the bow's highest point (0°)
${comment} to its lowest (180°), left and right alike (lib/view/arc-position.ts); upDir is the world's up (y or z, as the engine
${comment} has it). The two slices about it are blended linearly.`;

/** The arc position of a view ray in GLSL and HLSL (atan vs atan2, vec3 vs float3). */
const cLikeArc = (vec3: "vec3" | "float3", atan2: "atan" | "atan2") => `// Arc position of the view ray, degrees: 0 at the bow's top, 90 level with the antisolar point, 180 at its lowest.
float antisolarArcDeg(${vec3} viewDir, ${vec3} sunDir, ${vec3} upDir) {
  ${vec3} a = -normalize(sunDir);
  ${vec3} t = upDir - dot(upDir, a) * a;
  // The sun at the zenith: every direction round the antisolar point is as high as any other.
  if (length(t) < 1e-6) return 90.0;
  t = normalize(t);
  ${vec3} d = normalize(viewDir);
  return degrees(${atan2}(abs(dot(d, cross(a, t))), dot(d, t)));
}`;

/** The u mapping in GLSL and HLSL, which differ here only in the name of the 3-vector type. */
const cLikeMapping = (vec3: "vec3" | "float3") => `float antisolarAsinh(float x) { return log(x + sqrt(x * x + 1.0)); }

// u texture coordinate of the angle psiDeg (degrees).
float antisolarU(float psiDeg, float psiFromDeg, float psiToDeg, bool bowWeighted) {
  if (!bowWeighted) return (psiDeg - psiFromDeg) / (psiToDeg - psiFromDeg);
  float a0 = antisolarAsinh((psiFromDeg - ANTISOLAR_C) / ANTISOLAR_S);
  float a1 = antisolarAsinh((psiToDeg - ANTISOLAR_C) / ANTISOLAR_S);
  return (antisolarAsinh((psiDeg - ANTISOLAR_C) / ANTISOLAR_S) - a0) / (a1 - a0);
}

// viewDir: from the eye into the scene; sunDir: from the scene towards the sun. Both world space.
// The u of the view ray, outside [0, 1] where the texture has no data.
float antisolarViewU(${vec3} viewDir, ${vec3} sunDir, float psiFromDeg, float psiToDeg, bool bowWeighted) {
  float cosPsi = clamp(dot(normalize(viewDir), -normalize(sunDir)), -1.0, 1.0);
  return antisolarU(degrees(acos(cosPsi)), psiFromDeg, psiToDeg, bowWeighted);
}`;

export const shaderSnippets: Record<"glsl" | "hlsl" | "wgsl", string> = {
  glsl: `${usage("//")}
const float ANTISOLAR_C = ${c};
const float ANTISOLAR_S = ${s};

${cLikeMapping("vec3")}

vec4 antisolarSample(sampler2D lut, vec3 viewDir, vec3 sunDir, float sizeV,
                     float psiFromDeg, float psiToDeg, bool bowWeighted) {
  float u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return vec4(0.0);
  return texture(lut, vec2(u, sizeV));
}

${timeOfDayUsage("//")}
float antisolarSlice(float sunElevationDeg, float elevFromDeg, float elevToDeg, float slices) {
  return clamp((sunElevationDeg - elevFromDeg) / (elevToDeg - elevFromDeg), 0.0, 1.0) * (slices - 1.0);
}

vec4 antisolarSampleTimeOfDay(sampler2DArray lut, vec3 viewDir, vec3 sunDir, float sizeV,
                              float psiFromDeg, float psiToDeg, bool bowWeighted,
                              float sunElevationDeg, float elevFromDeg, float elevToDeg, float slices) {
  float u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return vec4(0.0);
  float s = antisolarSlice(sunElevationDeg, elevFromDeg, elevToDeg, slices);
  float s0 = floor(s);
  vec4 lower = texture(lut, vec3(u, sizeV, s0));
  vec4 upper = texture(lut, vec3(u, sizeV, min(s0 + 1.0, slices - 1.0)));
  return mix(lower, upper, s - s0);
}

${alongArcUsage("//")}
${cLikeArc("vec3", "atan")}

vec4 antisolarSampleAlongArc(sampler2DArray lut, vec3 viewDir, vec3 sunDir, vec3 upDir, float sizeV,
                             float psiFromDeg, float psiToDeg, bool bowWeighted,
                             float arcFromDeg, float arcToDeg, float slices) {
  float u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return vec4(0.0);
  float s = antisolarSlice(antisolarArcDeg(viewDir, sunDir, upDir), arcFromDeg, arcToDeg, slices);
  float s0 = floor(s);
  vec4 lower = texture(lut, vec3(u, sizeV, s0));
  vec4 upper = texture(lut, vec3(u, sizeV, min(s0 + 1.0, slices - 1.0)));
  return mix(lower, upper, s - s0);
}
`,
  hlsl: `${usage("//")}
static const float ANTISOLAR_C = ${c};
static const float ANTISOLAR_S = ${s};

${cLikeMapping("float3")}

float4 antisolarSample(Texture2D lut, SamplerState smp, float3 viewDir, float3 sunDir, float sizeV,
                       float psiFromDeg, float psiToDeg, bool bowWeighted) {
  float u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return float4(0.0, 0.0, 0.0, 0.0);
  return lut.SampleLevel(smp, float2(u, sizeV), 0);
}

${timeOfDayUsage("//")}
float antisolarSlice(float sunElevationDeg, float elevFromDeg, float elevToDeg, float slices) {
  return saturate((sunElevationDeg - elevFromDeg) / (elevToDeg - elevFromDeg)) * (slices - 1.0);
}

float4 antisolarSampleTimeOfDay(Texture2DArray lut, SamplerState smp, float3 viewDir, float3 sunDir, float sizeV,
                                float psiFromDeg, float psiToDeg, bool bowWeighted,
                                float sunElevationDeg, float elevFromDeg, float elevToDeg, float slices) {
  float u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return float4(0.0, 0.0, 0.0, 0.0);
  float s = antisolarSlice(sunElevationDeg, elevFromDeg, elevToDeg, slices);
  float s0 = floor(s);
  float4 lower = lut.SampleLevel(smp, float3(u, sizeV, s0), 0);
  float4 upper = lut.SampleLevel(smp, float3(u, sizeV, min(s0 + 1.0, slices - 1.0)), 0);
  return lerp(lower, upper, s - s0);
}

${alongArcUsage("//")}
${cLikeArc("float3", "atan2")}

float4 antisolarSampleAlongArc(Texture2DArray lut, SamplerState smp, float3 viewDir, float3 sunDir, float3 upDir, float sizeV,
                               float psiFromDeg, float psiToDeg, bool bowWeighted,
                               float arcFromDeg, float arcToDeg, float slices) {
  float u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) return float4(0.0, 0.0, 0.0, 0.0);
  float s = antisolarSlice(antisolarArcDeg(viewDir, sunDir, upDir), arcFromDeg, arcToDeg, slices);
  float s0 = floor(s);
  float4 lower = lut.SampleLevel(smp, float3(u, sizeV, s0), 0);
  float4 upper = lut.SampleLevel(smp, float3(u, sizeV, min(s0 + 1.0, slices - 1.0)), 0);
  return lerp(lower, upper, s - s0);
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
// The u of the view ray, outside [0, 1] where the texture has no data.
fn antisolarViewU(viewDir: vec3<f32>, sunDir: vec3<f32>, psiFromDeg: f32, psiToDeg: f32, bowWeighted: bool) -> f32 {
  let cosPsi = clamp(dot(normalize(viewDir), -normalize(sunDir)), -1.0, 1.0);
  return antisolarU(degrees(acos(cosPsi)), psiFromDeg, psiToDeg, bowWeighted);
}

fn antisolarSample(lut: texture_2d<f32>, smp: sampler, viewDir: vec3<f32>, sunDir: vec3<f32>, sizeV: f32,
                   psiFromDeg: f32, psiToDeg: f32, bowWeighted: bool) -> vec4<f32> {
  let u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) { return vec4<f32>(0.0); }
  return textureSampleLevel(lut, smp, vec2<f32>(u, sizeV), 0.0);
}

${timeOfDayUsage("//")}
fn antisolarSlice(sunElevationDeg: f32, elevFromDeg: f32, elevToDeg: f32, slices: f32) -> f32 {
  return clamp((sunElevationDeg - elevFromDeg) / (elevToDeg - elevFromDeg), 0.0, 1.0) * (slices - 1.0);
}

fn antisolarSampleTimeOfDay(lut: texture_2d_array<f32>, smp: sampler, viewDir: vec3<f32>, sunDir: vec3<f32>, sizeV: f32,
                            psiFromDeg: f32, psiToDeg: f32, bowWeighted: bool,
                            sunElevationDeg: f32, elevFromDeg: f32, elevToDeg: f32, slices: f32) -> vec4<f32> {
  let u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) { return vec4<f32>(0.0); }
  let s = antisolarSlice(sunElevationDeg, elevFromDeg, elevToDeg, slices);
  let s0 = floor(s);
  let lower = textureSampleLevel(lut, smp, vec2<f32>(u, sizeV), i32(s0), 0.0);
  let upper = textureSampleLevel(lut, smp, vec2<f32>(u, sizeV), i32(min(s0 + 1.0, slices - 1.0)), 0.0);
  return mix(lower, upper, s - s0);
}

${alongArcUsage("//")}
// Arc position of the view ray, degrees: 0 at the bow's top, 90 level with the antisolar point, 180 at its lowest.
fn antisolarArcDeg(viewDir: vec3<f32>, sunDir: vec3<f32>, upDir: vec3<f32>) -> f32 {
  let a = -normalize(sunDir);
  let tUp = upDir - dot(upDir, a) * a;
  // The sun at the zenith: every direction round the antisolar point is as high as any other.
  if (length(tUp) < 1e-6) { return 90.0; }
  let t = normalize(tUp);
  let d = normalize(viewDir);
  return degrees(atan2(abs(dot(d, cross(a, t))), dot(d, t)));
}

fn antisolarSampleAlongArc(lut: texture_2d_array<f32>, smp: sampler, viewDir: vec3<f32>, sunDir: vec3<f32>, upDir: vec3<f32>, sizeV: f32,
                           psiFromDeg: f32, psiToDeg: f32, bowWeighted: bool,
                           arcFromDeg: f32, arcToDeg: f32, slices: f32) -> vec4<f32> {
  let u = antisolarViewU(viewDir, sunDir, psiFromDeg, psiToDeg, bowWeighted);
  if (u < 0.0 || u > 1.0) { return vec4<f32>(0.0); }
  let s = antisolarSlice(antisolarArcDeg(viewDir, sunDir, upDir), arcFromDeg, arcToDeg, slices);
  let s0 = floor(s);
  let lower = textureSampleLevel(lut, smp, vec2<f32>(u, sizeV), i32(s0), 0.0);
  let upper = textureSampleLevel(lut, smp, vec2<f32>(u, sizeV), i32(min(s0 + 1.0, slices - 1.0)), 0.0);
  return mix(lower, upper, s - s0);
}
`,
};
