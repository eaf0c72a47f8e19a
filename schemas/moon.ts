import { z } from "zod";
import { atmosphereSchema } from "./atmosphere.js";
import { placeAndMomentSchema } from "./place-and-time.js";

const number = (min: number, max: number, description: string) => z.number().min(min).max(max).describe(description);

/** The moon as the light: its position (elevation or a moment and a place), phase, distance and the air it shines through. */
export const moonSchema = z
  .object({
    elevationDeg: number(-1, 90, "Moon's elevation above the horizon, degrees").default(10),
    at: placeAndMomentSchema.optional().describe("A moment and a place instead of elevationDeg: position, phase and distance are computed (meta.sourcePosition)"),
    phaseAngleDeg: number(0, 180, "Sun–moon–observer angle, degrees (0 = full moon, 90 = quarter); computed when `at` is given").default(0),
    distanceKm: number(356000, 407000, "Observer–moon distance, km (sets the disc and the brightness); computed when `at` is given").default(384400),
    atmosphere: atmosphereSchema.describe("Slant-path extinction of the moonlight (auto: applied, as moonlight is computed above the atmosphere)"),
  })
  .strict();

/** For views and sky maps, which also need the azimuth. */
export const moonPositionSchema = moonSchema
  .extend({ azimuthDeg: number(-360, 360, "Moon's azimuth, degrees clockwise from north (east = 90)").default(60) })
  .strict();

export type MoonInput = z.infer<typeof moonSchema>;
