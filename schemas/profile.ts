import { z } from "zod";
import { angleRangeSchema } from "./angles.js";
import { waterSchema } from "./water.js";
import { placeAndMomentSchema } from "./place-and-time.js";
import { atmosphereSchema } from "./atmosphere.js";
import { moonSchema } from "./moon.js";
import { adaptingLuminanceSchema, visionSchema } from "./vision.js";
import { RADIUS_DENSITIES } from "../lib/bow/radius-density.js";
import { arcPositionSchema, dropShapeSchema } from "./drop-shape.js";

const number = (min: number, max: number, description: string) => z.number().min(min).max(max).describe(description);

/** Drops per m³ of a monodisperse request that gives none (a size map's rows too). */
export const MONODISPERSE_NUMBER_PER_M3 = 1000;

export const dropsSchema = z
  .discriminatedUnion("kind", [
    z
      .object({
        kind: z.literal("monodisperse"),
        radiusUm: number(0.5, 3000, "Radius of every drop, µm").default(250),
        numberPerM3: number(0, 1e12, "Drops per m³").default(MONODISPERSE_NUMBER_PER_M3),
        shape: dropShapeSchema.optional(),
      })
      .strict(),
    z
      .object({
        kind: z.literal("marshall-palmer"),
        rainRateMmPerH: number(0.1, 150, "Rain rate, mm/h (Marshall & Palmer 1948)").default(2),
        shape: dropShapeSchema.optional(),
      })
      .strict(),
    z
      .object({
        kind: z.literal("gamma"),
        medianVolumeDiameterMm: number(0.01, 6, "Median volume diameter D0, mm (Ulbrich 1983)").default(1),
        mu: number(-0.99, 20, "Shape μ of N(D) = N0 D^μ exp(−ΛD), Λ = (3.67 + μ)/D0").default(2),
        totalNumberPerM3: number(0, 1e12, "Total drops per m³").default(1000),
        shape: dropShapeSchema.optional(),
      })
      .strict(),
    z
      .object({
        kind: z.literal("lognormal"),
        medianRadiusUm: number(0.5, 3000, "Median radius, µm").default(10),
        geometricSd: number(1.01, 4, "Geometric standard deviation σg").default(1.4),
        totalNumberPerM3: number(0, 1e12, "Total drops per m³ (fog: about 1e8)").default(1e8),
        shape: dropShapeSchema.optional(),
      })
      .strict(),
    z
      .object({
        kind: z.literal("histogram"),
        bins: z
          .array(
            z
              .object({
                radiusUm: number(0.5, 3000, "Bin centre radius, µm"),
                numberPerM3: number(0, 1e12, "Drops per m³ in the bin"),
              })
              .strict(),
          )
          .min(1)
          .max(200)
          .describe("Bins in ascending radius; each spans half-way (geometrically) to its neighbours"),
        shape: dropShapeSchema.optional(),
      })
      .strict(),
  ])
  .describe("Drop-size distribution");

export const sunSpectrumSchema = z.discriminatedUnion("kind", [
  z
    .object({
      kind: z.literal("astm-g173"),
      column: z.enum(["extraterrestrial", "global-tilt", "direct-circumsolar"]).default("extraterrestrial"),
    })
    .strict(),
  z.object({ kind: z.literal("blackbody"), temperatureK: number(1000, 50000, "Temperature, K").default(5772) }).strict(),
  z.object({ kind: z.literal("cie-d65") }).strict(),
  z.object({ kind: z.literal("cie-daylight"), cctK: number(4000, 25000, "Correlated colour temperature, K").default(5500) }).strict(),
  z
    .object({
      kind: z.literal("table"),
      wavelengthsNm: z.array(number(200, 2000, "Vacuum wavelength, nm")).min(2).max(5000),
      values: z.array(number(0, 1e6, "Spectral irradiance, W m⁻² nm⁻¹")).min(2).max(5000),
    })
    .strict(),
]);

export const sunSchema = z
  .object({
    spectrum: sunSpectrumSchema
      .default({ kind: "astm-g173", column: "extraterrestrial" })
      .describe("Sunlight above the atmosphere (astm-g173 extraterrestrial, blackbody) or at the ground (the others)"),
    elevationDeg: number(-1, 90, "Sun's elevation above the horizon, degrees").default(10),
    at: placeAndMomentSchema.optional().describe("A moment and a place instead of elevationDeg: the sun's apparent elevation is computed (meta.sourcePosition)"),
    atmosphere: atmosphereSchema,
    discDeg: number(0, 5, "Angular diameter of the source, degrees (0 = point source)").default(0.5329),
    limbDarkening: z.enum(["neckel-labs-1994", "uniform"]).default("neckel-labs-1994"),
  })
  .strict();

export const outputSchema = z
  .object({
    space: z.enum(["xyz-d65", "srgb-linear", "srgb", "display-p3", "rec2020", "acescg"]).default("srgb"),
    gamut: z.enum(["clip", "css4", "desaturate"]).default("css4"),
    normalise: z.enum(["peak", "physical"]).default("peak"),
    white: z.enum(["sun", "absolute"]).default("sun"),
    vision: visionSchema,
    adaptingLuminanceCdPerM2: adaptingLuminanceSchema,
  })
  .strict();

/** The sun every defaulted request gets: the sun schema's own field defaults (zod's .default skips inner defaults). */
export const defaultSun = sunSchema.parse({});

/** Vacuum wavelengths from fromNm to toNm in whole steps; the default step and its description differ by request. */
export function spectralSchema(defaultStepNm: number, stepDescription: string) {
  return z
    .object({
      fromNm: number(360, 830, "First wavelength (vacuum), nm").default(380),
      toNm: number(360, 830, "Last wavelength (vacuum), nm").default(780),
      stepNm: number(1, 20, stepDescription).default(defaultStepNm),
    })
    .strict()
    .default({ fromNm: 380, toNm: 780, stepNm: defaultStepNm })
    .superRefine((s, ctx) => {
      if (s.toNm <= s.fromNm) ctx.addIssue({ code: "custom", path: ["toNm"], message: "toNm must exceed fromNm" });
      else if (Math.abs((s.toNm - s.fromNm) / s.stepNm - Math.round((s.toNm - s.fromNm) / s.stepNm)) > 1e-9) {
        ctx.addIssue({ code: "custom", path: ["stepNm"], message: "toNm − fromNm must be a whole number of steps" });
      }
    });
}

export const profileMethods = ["auto", "mie", "airy", "geometric"] as const;

export const profileFieldsSchema = z
  .object({
    drops: dropsSchema.default({ kind: "marshall-palmer", rainRateMmPerH: 2 }),
    water: waterSchema.default({ temperatureC: 15, salinityPsu: 0 }),
    sun: sunSchema.default(defaultSun),
    moon: moonSchema.optional().describe("The moon as the light instead of the sun (leave sun out): position, phase, distance and atmosphere"),
    observer: z.enum(["cie1931-2", "cie1964-10"]).default("cie1931-2"),
    angles: angleRangeSchema({
      what: "angle ψ from the antisolar point",
      fromDeg: 30,
      toDeg: 60,
      stepDeg: 0.1,
      maxCount: 4001,
    }).default({ fromDeg: 30, toDeg: 60, stepDeg: 0.1 }),
    spectral: spectralSchema(10, "Wavelength step, nm"),
    method: z.enum(profileMethods).default("auto").describe("Single-drop engine; auto: exact Lorenz–Mie within a budget of Mie work, Airy theory only for the largest drops beyond it"),
    mieSizesPerDecade: z
      .literal(["auto", ...RADIUS_DENSITIES])
      .default("auto")
      .describe(
        "Drop sizes per decade of radius at which Lorenz–Mie rows are evaluated: the radius nodes stay 64 per decade, and each Mie node's row is the mean over sizes/64 radii across its cell, which averages the Mie ripple. auto: 64 when Mie-served drops carry under half the cross-section (rain), else enough for the ripple within the interactive budget; meta.radii.rule says what was chosen and why",
      ),
    arcPositionDeg: arcPositionSchema,
    polariserDeg: number(-180, 180, "Linear polariser's axis to the bow's tangent, degrees (0 strengthens the bow)").optional(),
    pathLengthM: number(1, 100000, "Path length through the rain along the line of sight, m").default(1000),
    output: outputSchema.default({ space: "srgb", gamut: "css4", normalise: "peak", white: "sun", vision: "camera" }),
  })
  .strict();

/** The physics every request that computes a profile shares, for the rules that span its fields. */
export interface ProfilePhysics {
  drops: z.output<typeof dropsSchema>;
  water: { salinityPsu: number };
  spectral: { fromNm: number; toNm: number };
  sun: { spectrum: z.output<typeof sunSpectrumSchema> };
}

/** Rules across a profile's fields, checked wherever such physics is sent (profile, view and sky scenario, texture scenario, size map). */
export function checkProfilePhysics(b: ProfilePhysics, ctx: z.RefinementCtx): void {
  if (b.water.salinityPsu > 0 && (b.spectral.fromNm < 400 || b.spectral.toNm > 700)) {
    ctx.addIssue({
      code: "custom",
      path: ["spectral", "fromNm"],
      message: "salt water (Quan & Fry 1995) is defined from 400 to 700 nm: set spectral to 400–700 nm",
    });
  }
  if (b.sun.spectrum.kind === "table" && b.sun.spectrum.wavelengthsNm.length !== b.sun.spectrum.values.length) {
    ctx.addIssue({ code: "custom", path: ["sun", "spectrum", "values"], message: "values must have one entry per wavelength" });
  }
  if (b.drops.kind === "histogram") {
    const r = b.drops.bins.map((bin) => bin.radiusUm);
    if (r.some((v, i) => i > 0 && v <= r[i - 1])) {
      ctx.addIssue({ code: "custom", path: ["drops", "bins"], message: "bins must be in strictly ascending radiusUm" });
    }
  }
}

export const profileRequestSchema = profileFieldsSchema.superRefine((b, ctx) => {
  checkProfilePhysics(b, ctx);
  if (b.drops.shape && b.drops.shape.kind !== "sphere" && b.method === "mie") {
    ctx.addIssue({
      code: "custom",
      path: ["drops", "shape"],
      message: 'flattened drops are served by ray optics with Airy-type bows: use method "auto", "airy" or "geometric", or shape {"kind":"sphere"} with "mie"',
    });
  }
});

export type ProfileRequest = z.infer<typeof profileRequestSchema>;

/** The request `{}` stands for: the base on which textures, views and size maps build their profiles' requests. */
export const profileDefaults: ProfileRequest = profileRequestSchema.parse({});
