import { z } from "zod";

/** Where the sun or moon was, when it was given as a moment and a place (`at`). */
export const sourcePositionSchema = z
  .strictObject({
    source: z.enum(["sun", "moon"]),
    utc: z.string(),
    latitudeDeg: z.number(),
    longitudeDeg: z.number(),
    heightM: z.number(),
    elevationDeg: z.number().describe("apparent (refracted) topocentric elevation of the disc's centre"),
    azimuthDeg: z.number().describe("clockwise from north (east = 90°)"),
    trueElevationDeg: z.number(),
    refractionDeg: z.number(),
    refractionModel: z.string(),
    ephemeris: z.string(),
    distanceKm: z.number(),
    belowHorizon: z.boolean(),
  })
  .describe("the light source's computed position");

/** The moon as the light: its phase, distance, disc and illuminance. */
export const moonlightSchema = z
  .strictObject({
    phaseAngleDeg: z.number(),
    distanceKm: z.number(),
    discDeg: z.number(),
    illuminanceLux: z.number().describe("above the atmosphere, on a surface facing the moon"),
    spectrum: z.string(),
    sources: z.array(z.string()),
  })
  .describe("the moon as the light source");

/** The vision an answer was rendered for: a camera, or a human eye at the scene's light level. */
export const visionMetaSchema = z
  .union([
    z.strictObject({ mode: z.literal("camera"), note: z.string() }),
    z.strictObject({
      mode: z.literal("eye"),
      adaptingLuminanceCdPerM2: z.number(),
      adaptingScotopicCdPerM2: z.number(),
      adaptationCoefficientM: z.number(),
      coneShare: z.number(),
      regime: z.string(),
      model: z.string(),
    }),
  ])
  .describe("camera (colorimetric) or eye (mesopic/scotopic vision)");

/** Fields every answer about a lit scene may carry when the light was given by time and place or is the moon. */
export const lightSourceFields = {
  sourcePosition: sourcePositionSchema.optional(),
  moonlight: moonlightSchema.optional(),
};
