import { z } from "zod";
import { checkProfilePhysics, profileRequestSchema, sunSchema } from "./profile.js";
import { refuseFlattenedDropsOnWater } from "./drop-shape.js";
import { placeAndMomentSchema } from "./place-and-time.js";
import { moonPositionSchema } from "./moon.js";
import { adaptingLuminanceSchema, visionSchema } from "./vision.js";
import { checkLayersFormat, layersSchema } from "./layers.js";
import { COX_MUNK_WIND_RANGE_MS } from "../lib/view/glitter.js";

const number = (min: number, max: number, description: string) => z.number().min(min).max(max).describe(description);
const profileFields = profileRequestSchema.shape;

/** The scene's physics: POST /v1/profile's body without what the view decides (angles, polariser, output, sun elevation). */
export const viewScenarioSchema = z
  .object({
    drops: profileFields.drops,
    water: profileFields.water,
    sun: sunSchema.omit({ elevationDeg: true, at: true }).prefault({}).describe("Sun spectrum, atmosphere and disc; its position is the body's `sun`"),
    observer: profileFields.observer,
    spectral: profileFields.spectral,
    method: profileFields.method,
    pathLengthM: profileFields.pathLengthM.describe("Path length through the rain along every line of sight, m (sets the bow's radiance and the curtain's opacity)"),
  })
  .strict()
  .superRefine(checkProfilePhysics)
  .prefault({})
  .describe("Drops, water, sunlight, observer, wavelengths, engine and path length, as in POST /v1/profile; angles are chosen to fit the image");

export const sunPositionSchema = z
  .object({
    azimuthDeg: number(-360, 360, "Sun's azimuth, degrees clockwise from north (east = 90)").default(240),
    elevationDeg: number(-1, 90, "Sun's elevation above the horizon, degrees").default(12),
    at: placeAndMomentSchema.optional().describe("A moment and a place instead of azimuthDeg/elevationDeg: the sun's apparent position is computed (manifest sourcePosition)"),
  })
  .strict()
  .prefault({});

export const layerSchema = z
  .enum(["premultiplied", "additive"])
  .default("premultiplied")
  .describe(
    "premultiplied: RGBA, RGB the rain's own radiance and A = 1 − T of the rain curtain (composite: out = RGB + (1 − A)·background); " +
      "additive: RGB only, to add onto a plate",
  );

export const viewOutputSchema = z
  .object({
    space: z
      .enum(["srgb-linear", "acescg", "xyz-d65"])
      .default("srgb-linear")
      .describe("Linear output space of exr, hdr and png16 (format=png is always an sRGB preview)"),
    gamut: z.enum(["clip", "css4", "desaturate"]).default("css4").describe("Gamut mapping of each profile sample before the image is made"),
    white: z.enum(["sun", "absolute"]).default("sun").describe("sun: the sun's light is rendered as the space's white"),
    normalise: z
      .enum(["peak", "physical"])
      .default("peak")
      .describe("peak: pixel luminance 1 = the brightest point of the bows (ψ 30°–60°); physical: 1 = referenceCdPerM2"),
    referenceCdPerM2: number(1e-3, 1e6, "Luminance that pixel value 1 stands for under normalise = physical, cd/m²").default(1000),
    vision: visionSchema,
    adaptingLuminanceCdPerM2: adaptingLuminanceSchema,
  })
  .strict()
  .prefault({});

export const cameraSchema = z
  .object({
    projection: z.enum(["rectilinear", "fisheye"]).default("rectilinear").describe("rectilinear: r = f·tan θ; fisheye (equidistant): r = f·θ"),
    horizontalFovDeg: z
      .number()
      .gt(0)
      .max(360)
      .optional()
      .describe("Horizontal field of view, degrees (rectilinear < 180); default 90 unless focalLengthMm is given"),
    focalLengthMm: number(1, 2000, "Lens focal length, mm (with sensorWidthMm instead of horizontalFovDeg)").optional(),
    sensorWidthMm: number(1, 100, "Sensor width, mm (36 = full frame)").default(36),
    widthPx: z.number().int().min(1).max(4096).default(1280).describe("Image width, pixels"),
    heightPx: z.number().int().min(1).max(4096).default(720).describe("Image height, pixels"),
    yawDeg: number(-360, 360, "Azimuth of the optical axis, degrees clockwise from north; default: the antisolar azimuth").optional(),
    pitchDeg: number(-90, 90, "Elevation of the optical axis, degrees (up positive)").default(15),
    rollDeg: number(-180, 180, "Turn about the optical axis, degrees; positive turns the camera clockwise as the photographer sees it").default(0),
  })
  .strict()
  .prefault({})
  .superRefine((c, ctx) => {
    if (c.horizontalFovDeg !== undefined && c.focalLengthMm !== undefined) {
      ctx.addIssue({ code: "custom", path: ["focalLengthMm"], message: "give horizontalFovDeg or focalLengthMm, not both" });
    }
    if (c.projection === "rectilinear" && c.horizontalFovDeg !== undefined && c.horizontalFovDeg >= 179) {
      ctx.addIssue({ code: "custom", path: ["horizontalFovDeg"], message: "a rectilinear view must be narrower than 179°; use projection fisheye" });
    }
  });

const waterSurfaceSchema = z
  .discriminatedUnion("kind", [
    z.object({ kind: z.literal("calm") }).strict(),
    z
      .object({
        kind: z.literal("rough"),
        windSpeedMs: number(
          COX_MUNK_WIND_RANGE_MS.min,
          COX_MUNK_WIND_RANGE_MS.max,
          "Wind speed at 12.5 m above the water, m/s: the range of Cox & Munk's (1954) sea-slope measurements",
        ),
      })
      .strict(),
  ])
  .optional()
  .describe(
    "Water below the horizon in place of the ground: the sun's light reflected by it makes a reflection bow centred as far above the horizon as the antisolar point is below it, and the water shows the bows mirrored (Fresnel reflectance of water, both polarisations). \"calm\": a level mirror; \"rough\": wind-ruffled (Cox & Munk 1954 slopes), the reflected sunlight spread over the glitter, so the reflection bow blurs",
  );

const maxAngleDeg = number(1, 180, "The rain curtain covers the sky out to this angle ψ from the antisolar point (default 90°: the shower lies opposite the sun); beyond it the layer is empty").default(90);

export const viewRequestSchema = z
  .object({
    scenario: viewScenarioSchema,
    camera: cameraSchema,
    sun: sunPositionSchema,
    moon: moonPositionSchema.optional().describe("The moon as the light instead of the sun (leave sun out): position, phase, distance and atmosphere; scenario.sun's spectrum and disc are then the moon's"),
    ground: z.boolean().default(true).describe("true: flat ground hides everything below the horizon (z < 0)"),
    waterSurface: waterSurfaceSchema,
    layer: layerSchema,
    polariserDeg: number(-180, 180, "Linear polariser's axis, degrees anticlockwise from the image's horizontal; omit for none").optional(),
    maxAngleDeg,
    output: viewOutputSchema,
  })
  .strict()
  .superRefine(refuseFlattenedDropsOnWater);

export const skyRequestSchema = z
  .object({
    scenario: viewScenarioSchema,
    widthPx: z.number().int().min(2).max(8192).default(2048).describe("Map width, pixels (360° of azimuth)"),
    heightPx: z.number().int().min(1).max(4096).default(1024).describe("Map height, pixels (180° of elevation); width/height must be 2"),
    sun: sunPositionSchema,
    moon: moonPositionSchema.optional().describe("The moon as the light instead of the sun (leave sun out): position, phase, distance and atmosphere; scenario.sun's spectrum and disc are then the moon's"),
    polariserToTangentDeg: number(-180, 180, "A linear polariser held at this angle to the bow's tangent everywhere (as polariserDeg of /v1/profile); omit for none").optional(),
    ground: z.boolean().default(true).describe("true: the lower half (elevation < 0) is left empty"),
    waterSurface: waterSurfaceSchema,
    layer: layerSchema,
    maxAngleDeg,
    output: viewOutputSchema,
  })
  .strict()
  .superRefine(refuseFlattenedDropsOnWater)
  .superRefine((s, ctx) => {
    if (s.widthPx !== 2 * s.heightPx) ctx.addIssue({ code: "custom", path: ["heightPx"], message: "an equirectangular map is twice as wide as high" });
    if (s.waterSurface && s.polariserToTangentDeg !== undefined) {
      ctx.addIssue({
        code: "custom",
        path: ["polariserToTangentDeg"],
        message: "a polariser at a fixed angle to the bow's tangent has no meaning on the water's mirrored bows; leave it out with waterSurface",
      });
    }
  });

export const imageQuerySchema = z
  .object({
    format: z.enum(["exr", "hdr", "png16", "png"]).default("exr").describe("exr: half float, ZIP; hdr: Radiance RGBE; png16: linear with ICC; png: 8-bit sRGB preview, ordered dither"),
    part: z.enum(["image", "manifest"]).default("image").describe("manifest: JSON sidecar (camera, mapping, scale, hash, sources) instead of the image"),
    layers: layersSchema,
  })
  .strict()
  .superRefine(checkLayersFormat);

export type ViewRequest = z.infer<typeof viewRequestSchema>;
export type SkyRequest = z.infer<typeof skyRequestSchema>;
export type ViewScenario = z.infer<typeof viewScenarioSchema>;
export type ImageQuery = z.infer<typeof imageQuerySchema>;
