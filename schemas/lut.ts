import { z } from "zod";
import { checkProfilePhysics, profileDefaults, profileFieldsSchema } from "./profile.js";
import { isFlattened } from "./drop-shape.js";
import { checkLayersFormat, layersSchema } from "./layers.js";

const scenarioSchema = profileFieldsSchema.omit({ angles: true, output: true });

/** Most sun-elevation slices in one time-of-day texture. */
export const MAX_SUN_SLICES = 32;
/** Most arc-position slices: every 2.5° from the bow's top to its lowest point. */
export const MAX_ARC_SLICES = 73;
/** Arc-position slices of a texture of flattened drops that does not say: every 5° from 0° to 180° (pipeline/compute/arc-nodes.ts). */
export const DEFAULT_ARC_SLICES = { fromDeg: 0, toDeg: 180, slices: 37 } as const;
/** Most texels in a time-of-day texture: 8 MiB as RGBA16F (the largest single-elevation texture, 4096 × 256). */
export const MAX_SLICED_TEXELS = 4096 * 256;

export const lutSpaces = ["acescg", "srgb-linear", "xyz-d65"] as const;

export const lutRequestSchema = z
  .object({
    scenario: scenarioSchema
      .partial()
      .strict()
      // Fields left out are the profile's defaults; the rules across fields apply to the whole.
      .superRefine((s, ctx) => checkProfilePhysics({ ...profileDefaults, ...s }, ctx))
      .default({})
      .describe(
        "The profile request's physics (drops are used by the 1-D variant only; the size axis replaces them in 2-D, keeping drops.shape: flattened drops give every row their shape)",
      ),
    angles: z
      .object({
        fromDeg: z.number().min(0).max(180).default(30).describe("ψ at the texture's left edge, degrees"),
        toDeg: z.number().min(0).max(180).default(60).describe("ψ at the right edge, degrees"),
        texels: z.number().int().min(2).max(4096).default(256),
        mapping: z.enum(["linear", "bow-weighted"]).default("bow-weighted").describe("bow-weighted: denser texels near the bows"),
      })
      .strict()
      .default({ fromDeg: 30, toDeg: 60, texels: 256, mapping: "bow-weighted" })
      .superRefine((a, ctx) => {
        if (a.toDeg <= a.fromDeg) ctx.addIssue({ code: "custom", path: ["toDeg"], message: "toDeg must exceed fromDeg" });
      }),
    sizes: z
      .discriminatedUnion("kind", [
        z
          .object({
            kind: z.literal("radius"),
            fromUm: z.number().min(1).max(3000).default(10),
            toUm: z.number().min(1).max(3000).default(2000),
            texels: z.number().int().min(1).max(256).default(32),
            liquidWaterGPerM3: z.number().min(1e-6).max(10).default(0.1).describe("Liquid water content; sets each row's number density"),
          })
          .strict(),
        z
          .object({
            kind: z.literal("rain-rate"),
            fromMmPerH: z.number().min(0.1).max(150).default(0.5),
            toMmPerH: z.number().min(0.1).max(150).default(50),
            texels: z.number().int().min(1).max(256).default(16),
          })
          .strict(),
        z.object({ kind: z.literal("none") }).strict(),
      ])
      .default({ kind: "radius", fromUm: 10, toUm: 2000, texels: 32, liquidWaterGPerM3: 0.1 })
      .describe("The texture's rows: log-spaced monodisperse radii, log-spaced Marshall–Palmer rain rates, or none (1-D: the scenario's drops)"),
    space: z.enum(lutSpaces).default("acescg").describe("Linear colour space of the texels"),
    sunElevations: z
      .object({
        fromDeg: z.number().min(-1).max(90).describe("Sun elevation of the first slice, degrees"),
        toDeg: z.number().min(-1).max(90).describe("Sun elevation of the last slice, degrees"),
        slices: z.number().int().min(2).max(MAX_SUN_SLICES).describe(`Evenly spaced elevations, 2 to ${MAX_SUN_SLICES}`),
      })
      .strict()
      .optional()
      .describe("A time-of-day texture: one slice per sun elevation (KTX2 array layers, or slices stacked in one image)"),
    arcPositions: z
      .object({
        fromDeg: z.number().min(0).max(180).describe("Arc position of the first slice: degrees around the antisolar point from the bow's highest point"),
        toDeg: z.number().min(0).max(180).describe("Arc position of the last slice (180 = the bow's lowest point)"),
        slices: z.number().int().min(2).max(MAX_ARC_SLICES).describe(`Evenly spaced arc positions, 2 to ${MAX_ARC_SLICES}`),
      })
      .strict()
      .optional()
      .describe(
        `Flattened drops (scenario.drops.shape): one slice per arc position, as the time-of-day slices; default ${DEFAULT_ARC_SLICES.fromDeg}°–${DEFAULT_ARC_SLICES.toDeg}° in ${DEFAULT_ARC_SLICES.slices} slices (every 5°)`,
      ),
  })
  .strict()
  .superRefine((b, ctx) => {
    const flattened = isFlattened(b.scenario.drops?.shape);
    if (flattened && b.sunElevations) {
      ctx.addIssue({
        code: "custom",
        path: ["sunElevations"],
        message: "a texture has one slice axis: flattened drops slice it by arc position, so leave sunElevations out (or ask one texture per sun elevation)",
      });
    }
    if (b.arcPositions && b.arcPositions.toDeg <= b.arcPositions.fromDeg) {
      ctx.addIssue({ code: "custom", path: ["arcPositions", "toDeg"], message: "toDeg must exceed fromDeg" });
    }
    if (b.arcPositions && !flattened) {
      ctx.addIssue({ code: "custom", path: ["arcPositions"], message: 'arc-position slices need flattened drops: set scenario.drops.shape {"kind":"equilibrium"} or leave arcPositions out (spheres make the same bow all along the arc)' });
    }
    if (flattened) {
      const rows = b.sizes.kind === "none" ? 1 : b.sizes.texels;
      const texels = b.angles.texels * rows * (b.arcPositions ?? DEFAULT_ARC_SLICES).slices;
      if (texels > MAX_SLICED_TEXELS) {
        ctx.addIssue({
          code: "custom",
          path: ["arcPositions", "slices"],
          message: `angle texels × size texels × arc slices = ${texels}, over the limit of ${MAX_SLICED_TEXELS.toLocaleString("en")} texels`,
        });
      }
    }
    if (b.sunElevations) {
      if (b.sunElevations.toDeg <= b.sunElevations.fromDeg) {
        ctx.addIssue({ code: "custom", path: ["sunElevations", "toDeg"], message: "toDeg must exceed fromDeg" });
      }
      const rows = b.sizes.kind === "none" ? 1 : b.sizes.texels;
      const texels = b.angles.texels * rows * b.sunElevations.slices;
      if (texels > MAX_SLICED_TEXELS) {
        ctx.addIssue({
          code: "custom",
          path: ["sunElevations", "slices"],
          message: `angle texels × size texels × slices = ${texels}, over the limit of ${MAX_SLICED_TEXELS.toLocaleString("en")} texels`,
        });
      }
    }
    if (b.sizes.kind === "radius" && b.sizes.toUm <= b.sizes.fromUm) {
      ctx.addIssue({ code: "custom", path: ["sizes", "toUm"], message: "toUm must exceed fromUm" });
    }
    if (b.sizes.kind === "rain-rate" && b.sizes.toMmPerH <= b.sizes.fromMmPerH) {
      ctx.addIssue({ code: "custom", path: ["sizes", "toMmPerH"], message: "toMmPerH must exceed fromMmPerH" });
    }
  });

export type LutRequest = z.infer<typeof lutRequestSchema>;

export const lutQuerySchema = z
  .object({
    format: z
      .enum(["exr", "ktx2", "hdr", "png16", "json"])
      .default("exr")
      .describe("exr: OpenEXR, ZIP; ktx2: KTX 2.0 RGBA16F/RGBA32F for engines; hdr: Radiance RGBE; png16: scaled 16-bit PNG; json: texel values"),
    part: z.enum(["image", "manifest"]).default("image").describe("manifest: the JSON that maps texels to angle and size"),
    pixelType: z.enum(["half", "float"]).default("half").describe("EXR and KTX2 sample type (KTX2: RGBA16F or RGBA32F)"),
    layers: layersSchema,
  })
  .strict()
  .superRefine(checkLayersFormat);

export const shaderQuerySchema = z.object({ lang: z.enum(["glsl", "hlsl", "wgsl"]).default("glsl") }).strict();
