import { lightSourceFields, visionMetaSchema } from "./light-source-response.js";
import { z } from "zod";
import { outputSchema, profileMethods, profileRequestSchema } from "../profile.js";
import { shapeMetaSchema } from "./shape-meta.js";

const rgbTriple = z.tuple([z.number(), z.number(), z.number()]);

export const bowsSchema = z
  .strictObject({
    primaryDeg: z.number().nullable().describe("ψ of the primary bow's luminance peak, or null when there is none"),
    secondaryDeg: z.number().nullable().describe("ψ of the secondary bow's luminance peak, or null"),
  })
  .describe("where the bows are, degrees from the antisolar point");

export const engineRangeSchema = z.strictObject({
  engine: z.enum(["mie", "airy", "geometric"]),
  fromUm: z.number(),
  toUm: z.number(),
  nodes: z.number().int(),
  estimatedError: z.string().optional(),
});

export const methodSummarySchema = z
  .strictObject({
    requested: z.enum(profileMethods),
    engines: z.array(engineRangeSchema).describe("which engine served which drop radii"),
    rule: z.string().optional().describe('method "auto": why it chose these engines (its Mie budget) and their measured error against full Mie'),
  })
  .describe("the engine asked for and those used");

export const wavelengthsSummarySchema = z.strictObject({
  fromNm: z.number(),
  toNm: z.number(),
  stepNm: z.number(),
  count: z.number().int(),
  medium: z.literal("vacuum"),
});

export const radiiSummarySchema = z.strictObject({
  nodes: z.number().int(),
  fromUm: z.number(),
  toUm: z.number(),
  nodesPerDecade: z.number(),
  mieSizesPerDecade: z.number(),
  rule: z.string(),
});

export const sunSummarySchema = z.strictObject({ scale: z.string(), attenuated: z.boolean() });

export const profileMetaSchema = z
  .strictObject({
    method: methodSummarySchema,
    shape: shapeMetaSchema,
    units: z.strictObject({ anglesDeg: z.string(), luminance: z.string(), xyz: z.string(), spectralRadiance: z.string(), rgb: z.string() }),
    normalisation: outputSchema.shape.normalise.unwrap(),
    peakLuminanceCdPerM2: z.number(),
    wavelengths: wavelengthsSummarySchema,
    radii: radiiSummarySchema,
    sun: sunSummarySchema,
    water: z.string().describe("the water index's source"),
    colour: z.strictObject({ whiteAdaptation: z.string(), spaceAdaptation: z.string() }),
    mieTermAngles: z.number().describe("Lorenz–Mie work done for this answer (terms × angles)"),
    computeMs: z.number(),
    kernel: z.strictObject({
      angleStepDeg: z.number(),
      rows: z.number().int(),
      memoryHits: z.number().int(),
      diskHits: z.number().int(),
      computed: z.number().int(),
      sumsKept: z
        .number()
        .int()
        .describe("wavelengths whose sum over the drops was kept in memory from an earlier profile of the same drops, water and angle lattice (then no row is read: rows 0)"),
      ms: z.number(),
    }),
    cache: z.enum(["hit", "miss"]),
    hash: z.string().describe("content hash of the normalised request"),
    sources: z.array(z.string()).describe("published sources of the physics used"),
    warnings: z.array(z.string()),
    vision: visionMetaSchema.optional(),
    ...lightSourceFields,
  })
  .describe("how a profile was computed: engines, grids, units, cost, provenance");

export const profileResponseSchema = z
  .strictObject({
    anglesDeg: z.array(z.number()).describe("ψ of each sample, degrees from the antisolar point"),
    xyz: z.array(rgbTriple).describe("CIE XYZ per sample"),
    chromaticity: z.array(z.tuple([z.number(), z.number()])).describe("CIE x, y per sample"),
    luminance: z.array(z.number()),
    rgb: z.array(rgbTriple).describe("RGB in `space` per sample"),
    space: outputSchema.shape.space.unwrap(),
    outOfGamut: z.array(z.boolean()),
    polarisation: z.array(z.number()).describe("degree of linear polarisation per sample"),
    bows: bowsSchema,
    meta: profileMetaSchema,
  })
  .describe("POST /v1/profile (JSON): the bow's colour against ψ");

export const presetListSchema = z
  .strictObject({
    presets: z.array(z.strictObject({ name: z.string(), title: z.string(), description: z.string() })),
  })
  .describe("GET /v1/presets: the named demo scenarios");

export const presetSchema = z
  .strictObject({
    name: z.string(),
    title: z.string(),
    description: z.string(),
    body: profileRequestSchema.describe("a complete body for POST /v1/profile"),
  })
  .describe("GET /v1/presets/:name: one demo scenario");

export type ProfileMeta = z.infer<typeof profileMetaSchema>;
export type ProfileResponse = z.infer<typeof profileResponseSchema>;
export type EngineRange = z.infer<typeof engineRangeSchema>;
export type Bows = z.infer<typeof bowsSchema>;
export type PresetList = z.infer<typeof presetListSchema>;
export type Preset = z.infer<typeof presetSchema>;
