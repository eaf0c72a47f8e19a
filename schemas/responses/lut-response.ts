import { lightSourceFields } from "./light-source-response.js";
import { z } from "zod";
import { orderLayersManifestSchema } from "./order-layers-response.js";
import { lutRequestSchema, lutSpaces } from "../lut.js";


export const lutManifestSchema = z
  .strictObject({
    width: z.number().int(),
    height: z.number().int(),
    channels: z.tuple([z.literal("R"), z.literal("G"), z.literal("B"), z.literal("A")]),
    rowOrder: z.string(),
    u: z.strictObject({
      quantity: z.string(),
      unit: z.literal("degree"),
      mapping: lutRequestSchema.shape.angles.unwrap().shape.mapping.unwrap(),
      fromDeg: z.number(),
      toDeg: z.number(),
      formula: z.string().describe("ψ as a function of the texture coordinate u"),
      centreDeg: z.number().optional().describe("bow-weighted mapping: its centre c"),
      scaleDeg: z.number().optional().describe("bow-weighted mapping: its scale s"),
      texelCentresDeg: z.array(z.number()).describe("ψ at each texel's centre"),
    }),
    v: z.strictObject({
      quantity: z.string().describe("what the rows stand for: radiusUm, rainRateMmPerH or the scenario's drops"),
      mapping: z.string(),
      values: z.array(z.number()).describe("the quantity at each row"),
      transmittance: z.array(z.number()).describe("the rain curtain's transmittance T at each row"),
    }),
    colourSpace: z.enum(lutSpaces),
    transferFunction: z.literal("linear"),
    white: z.string(),
    scale: z.string(),
    alpha: z.string(),
    additiveUse: z.string(),
    scenario: lutRequestSchema.describe("the normalised request"),
    hash: z.string(),
    sources: z.array(z.string()),
    warnings: z.array(z.string()),
    computeMs: z.number(),
    slices: z
      .strictObject({
        quantity: z.string(),
        unit: z.literal("degree"),
        fromDeg: z.number(),
        toDeg: z.number(),
        count: z.number().int(),
        valuesDeg: z.array(z.number()),
        mapping: z.string(),
        layoutKtx2: z.string(),
        layoutStacked: z.string(),
        transmittance: z.string(),
        sliceHashes: z.array(z.string()),
      })
      .optional()
      .describe("sliced textures: time of day (sunElevations) or flattened drops (arc positions): the value of each slice and where the slices are"),
    layers: orderLayersManifestSchema.optional(),
    ...lightSourceFields,
  })
  .describe("POST /v1/lut?part=manifest: how to sample the lookup texture");

const texelRows = z.array(z.array(z.tuple([z.number(), z.number(), z.number(), z.number()])));

export const lutJsonResponseSchema = z
  .union([
    z.strictObject({ manifest: lutManifestSchema, texels: texelRows.describe("rows (top first) of RGBA texels") }),
    z.strictObject({
      manifest: lutManifestSchema,
      slices: z.array(texelRows).describe("sliced textures: per sun elevation or arc position (manifest.slices), rows (top first) of RGBA texels"),
    }),
  ])
  .describe("POST /v1/lut?format=json: the manifest and the texels");

export type LutManifest = z.infer<typeof lutManifestSchema>;
export type LutJsonResponse = z.infer<typeof lutJsonResponseSchema>;
