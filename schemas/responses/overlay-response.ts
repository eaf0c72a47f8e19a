import { lightSourceFields, visionMetaSchema } from "./light-source-response.js";
import { z } from "zod";
import { orderLayersManifestSchema } from "./order-layers-response.js";
import { cameraSchema, layerSchema, viewOutputSchema, imageQuerySchema } from "../view.js";
import { shapeMetaSchema } from "./shape-meta.js";
import { bowsSchema, methodSummarySchema, radiiSummarySchema, sunSummarySchema, wavelengthsSummarySchema } from "./profile-response.js";

const vec3 = z.tuple([z.number(), z.number(), z.number()]).describe("unit vector in the world frame (x east, y north, z up)");
const xy = z.tuple([z.number(), z.number()]).readonly();

export const cameraDescriptionSchema = z.strictObject({
  kind: z.literal("camera"),
  projection: cameraSchema.unwrap().shape.projection.unwrap(),
  mapping: z.string(),
  widthPx: z.number().int(),
  heightPx: z.number().int(),
  focalPx: z.number(),
  horizontalFovDeg: z.number(),
  verticalFovDeg: z.number(),
  principalPointPx: xy,
  pixelCentres: z.string(),
  yawDeg: z.number(),
  pitchDeg: z.number(),
  rollDeg: z.number(),
  rollConvention: z.string(),
  axes: z.strictObject({ forward: vec3, right: vec3, up: vec3 }),
  polariser: z.strictObject({ axisDeg: z.number(), convention: z.string() }).nullable(),
});

export const mapDescriptionSchema = z.strictObject({
  kind: z.literal("equirectangular"),
  widthPx: z.number().int(),
  heightPx: z.number().int(),
  mapping: z.string(),
});

const position = { azimuthDeg: z.number(), elevationDeg: z.number(), direction: vec3 };

const overlayFields = {
  frame: z.string(),
  sun: z.strictObject(position),
  antisolarPoint: z.strictObject(position),
  ground: z.string(),
  waterSurface: z
    .strictObject({
      kind: z.enum(["calm", "rough"]),
      rough: z
        .strictObject({
          windSpeedMs: z.number(),
          meanSquareSlope: z.number().describe("σ² of the facet slopes, Cox & Munk (1954)"),
          sunReflectance: z.number().describe("share of the sunlight the rough water reflects upwards (sum over the glitter groups)"),
          groups: z.number().int().describe("glitter groups (bins of reflected elevation), one reflection bow each"),
          model: z.string(),
        })
        .optional(),
      refractiveIndex: z.number(),
      reflectionBowCentre: z.strictObject(position),
      sunReflectance: z.strictObject({ s: z.number(), p: z.number(), unpolarised: z.number() }),
      model: z.string(),
    })
    .optional()
    .describe("the water below the horizon and the reflection bow's centre, when waterSurface was asked for"),
  layer: z.strictObject({
    kind: layerSchema.unwrap(),
    channels: z.enum(["RGBA", "RGB"]),
    meaning: z.string(),
    alpha: z.number().nullable().describe("alpha of every pixel that sees rain, or null for the additive layer"),
    curtain: z.strictObject({
      opticalDepth: z.number(),
      transmittance: z.number(),
      qExtRange: z.array(z.number()).max(2).describe("smallest and largest extinction efficiency over the drop sizes (empty without drops)"),
      wavelengthNm: z.number(),
      pathLengthM: z.number(),
      model: z.string(),
    }),
    curtainExtent: z.string(),
  }),
  scale: z.strictObject({
    normalisation: viewOutputSchema.unwrap().shape.normalise.unwrap(),
    meaning: z.string(),
    referenceCdPerM2: z.number(),
    factor: z.number(),
    factorMeaning: z.string(),
    peakBowCdPerM2: z.number(),
  }),
  units: z.strictObject({ pixels: z.string(), radiance: z.string() }),
  output: z.strictObject({
    format: imageQuerySchema.shape.format.unwrap(),
    space: z.enum(["srgb", "srgb-linear", "acescg", "xyz-d65"]),
    chromaticities: z.strictObject({ red: xy, green: xy, blue: xy, white: xy, source: z.string() }),
    gamut: viewOutputSchema.unwrap().shape.gamut.unwrap(),
    white: viewOutputSchema.unwrap().shape.white.unwrap(),
    samplesOutOfGamut: z.number().int(),
    quantising: z.string(),
  }),
  profile: z.strictObject({
    anglesDeg: z.strictObject({ fromDeg: z.number(), toDeg: z.number(), stepDeg: z.number(), count: z.number().int() }),
    seenAnglesDeg: z.strictObject({ minDeg: z.number(), maxDeg: z.number() }).nullable().describe("ψ range the pixels see, or null when none sees rain"),
    interpolation: z.string(),
    bows: bowsSchema,
    method: methodSummarySchema,
    wavelengths: wavelengthsSummarySchema,
    radii: radiiSummarySchema,
    sun: sunSummarySchema,
    water: z.string(),
    vision: visionMetaSchema.optional(),
    shape: shapeMetaSchema.optional().describe("the drop shape; with flattened drops the profile described here is the arc node nearest the bow's side"),
  }),
  layers: orderLayersManifestSchema.optional(),
  arcPositions: z
    .strictObject({
      quantity: z.string(),
      nodesDeg: z.array(z.number()).describe("arc positions of the profiles the pixels blend between, degrees"),
      seenDeg: z.strictObject({ minDeg: z.number(), maxDeg: z.number() }).nullable().describe("arc positions the pixels see"),
      stepDeg: z.number(),
      interpolation: z.string(),
      tolerance: z.string(),
      bows: z.array(z.strictObject({ arcPositionDeg: z.number(), primaryDeg: z.number().nullable(), secondaryDeg: z.number().nullable() })),
      profileHashes: z.array(z.string()),
    })
    .optional()
    .describe("flattened drops only: the bow changes along its arc; the profiles at these arc positions and how pixels blend them"),
  hash: z.string(),
  cache: z.enum(["hit", "miss"]),
  computeMs: z.number(),
  sources: z.array(z.string()),
  warnings: z.array(z.string()),
  ...lightSourceFields,
};

export const viewManifestSchema = z
  .strictObject({ endpoint: z.literal("/v1/view"), camera: cameraDescriptionSchema, ...overlayFields })
  .describe("POST /v1/view?part=manifest: camera, mapping, scale and provenance of the layer");

export const skyManifestSchema = z
  .strictObject({ endpoint: z.literal("/v1/sky"), map: mapDescriptionSchema, ...overlayFields })
  .describe("POST /v1/sky?part=manifest: map, scale and provenance of the layer");

export type CameraDescription = z.infer<typeof cameraDescriptionSchema>;
export type MapDescription = z.infer<typeof mapDescriptionSchema>;
export type ViewManifest = z.infer<typeof viewManifestSchema>;
export type SkyManifest = z.infer<typeof skyManifestSchema>;
export type OverlayManifest = ViewManifest | SkyManifest;
