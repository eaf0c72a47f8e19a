import { z } from "zod";
import { angleRangeSchema } from "./angles.js";
import { waterSchema } from "./water.js";
import { moonSchema } from "./moon.js";
import { arcPositionSchema, dropShapeSchema } from "./drop-shape.js";
import { checkProfilePhysics, defaultSun, MONODISPERSE_NUMBER_PER_M3, outputSchema, profileDefaults, profileMethods, spectralSchema, sunSchema, type ProfileRequest } from "./profile.js";

export const svgQuerySchema = z
  .object({ format: z.enum(["svg"]).optional().describe("Output file: svg (the only one for this figure)") })
  .strict();

export const sizeMapQuerySchema = z
  .object({
    format: z
      .enum(["svg", "png"])
      .optional()
      .describe("svg: the labelled figure; png: the map alone, one pixel per (angle, radius) sample, largest radius on top"),
  })
  .strict();

export const SIZE_MAP_MAX_RADII = 64;
/** Columns of the map; each becomes one rectangle per row of the SVG, so the figure stays a few MB at most. */
export const SIZE_MAP_MAX_ANGLES = 721;

const number = (min: number, max: number, description: string) => z.number().min(min).max(max).describe(description);

export const sizeMapRequestSchema = z
  .object({
    radiusFromUm: number(0.5, 3000, "Smallest drop radius (bottom row), µm").default(10),
    radiusToUm: number(0.5, 3000, "Largest drop radius (top row), µm").default(2000),
    radiusSteps: z.number().int().min(2).max(SIZE_MAP_MAX_RADII).default(24).describe("Rows: radii log-spaced from radiusFromUm to radiusToUm"),
    shape: dropShapeSchema.optional().describe("Drop shape of every row, as drops.shape of POST /v1/profile (default: spheres); flattened drops make the map depend on arcPositionDeg"),
    arcPositionDeg: arcPositionSchema.describe(
      "With flattened drops: where along the bow the map is taken, degrees around the antisolar point from the bow's highest point (0 = top, 90 = side, 180 = lowest); default 90",
    ),
    water: waterSchema.default({ temperatureC: 15, salinityPsu: 0 }),
    sun: sunSchema.default(defaultSun),
    moon: moonSchema.optional().describe("The moon as the light instead of the sun, as in POST /v1/profile"),
    observer: z.enum(["cie1931-2", "cie1964-10"]).default("cie1931-2"),
    angles: angleRangeSchema({ what: "angle ψ from the antisolar point", fromDeg: 30, toDeg: 60, stepDeg: 0.25, maxCount: SIZE_MAP_MAX_ANGLES }).default({
      fromDeg: 30,
      toDeg: 60,
      stepDeg: 0.25,
    }),
    spectral: spectralSchema(20, "Wavelength step, nm (coarser than a profile's default: a map runs one profile per row)"),
    method: z.enum(profileMethods).default("auto").describe("Single-drop engine; auto: exact Lorenz–Mie within a budget of Mie work, Airy theory only for the largest drops beyond it"),
    output: outputSchema
      .pick({ gamut: true, white: true })
      .default({ gamut: "css4", white: "sun" })
      .describe("Gamut mapping and white; the map is always sRGB, each row relative to its own peak"),
  })
  .strict()
  .superRefine((b, ctx) => {
    if (b.radiusToUm <= b.radiusFromUm) ctx.addIssue({ code: "custom", path: ["radiusToUm"], message: `radiusToUm must exceed radiusFromUm (${b.radiusFromUm})` });
    // Every row is a profile: its rules across fields (salt water's band, tables) apply.
    checkProfilePhysics(sizeMapRowRequest(b, b.radiusFromUm), ctx);
  });

export type SizeMapRequest = z.infer<typeof sizeMapRequestSchema>;

/** The profile request of one row of a size map, built from the validated map request. */
export function sizeMapRowRequest(b: Omit<SizeMapRequest, "radiusFromUm" | "radiusToUm" | "radiusSteps">, radiusUm: number): ProfileRequest {
  return {
    ...profileDefaults,
    drops: { kind: "monodisperse", radiusUm, numberPerM3: MONODISPERSE_NUMBER_PER_M3, ...(b.shape ? { shape: b.shape } : {}) },
    ...(b.arcPositionDeg !== undefined ? { arcPositionDeg: b.arcPositionDeg } : {}),
    water: b.water,
    sun: b.sun,
    moon: b.moon,
    observer: b.observer,
    angles: b.angles,
    spectral: b.spectral,
    method: b.method,
    output: { ...profileDefaults.output, space: "srgb", gamut: b.output.gamut, normalise: "peak", white: b.output.white },
  };
}
