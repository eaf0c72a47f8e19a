import { z } from "zod";
import { angleRangeSchema } from "./angles.js";
import { waterSchema } from "./water.js";

export const scatterMethods = ["mie", "debye", "airy", "geometric"] as const;

export const refractiveIndexSchema = z
  .object({
    re: z.number().min(0.1).max(20).describe("Real part n of the drop's index relative to the surrounding medium"),
    im: z.number().min(0).max(20).default(0).describe("Imaginary part k ≥ 0 (absorption), m = n + ik"),
  })
  .strict();

export const scatterRequestSchema = z
  .object({
    radiusUm: z.number().min(0.001).max(5000).default(500).describe("Drop radius, µm"),
    wavelengthNm: z.number().min(200).max(20000).default(550).describe("Wavelength in vacuum, nm"),
    refractiveIndex: refractiveIndexSchema
      .optional()
      .describe("Explicit relative refractive index; when absent it follows from `water` (relative to air)"),
    water: waterSchema.optional().describe("Water of the drop (default 20 °C fresh water); excludes refractiveIndex"),
    scatteringAngles: angleRangeSchema({
      what: "scattering angle Θ (0 = forward)",
      fromDeg: 0,
      toDeg: 180,
      stepDeg: 0.5,
      maxCount: 200_001,
    }).default({ fromDeg: 0, toDeg: 180, stepDeg: 0.5 }),
    method: z.enum(scatterMethods).default("mie").describe("Single-drop engine"),
    debyeOrder: z
      .number()
      .int()
      .min(0)
      .max(12)
      .optional()
      .describe("Debye order p (0 reflection, 1 transmission, 2 primary bow, 3 secondary…); method debye only, default 2"),
    orders: z
      .array(z.number().int().min(0).max(12))
      .min(1)
      .max(13)
      .optional()
      .describe("Ray orders p (number of chords) to sum; methods airy (default [2, 3]) and geometric (default 0–6)"),
  })
  .strict()
  .superRefine((b, ctx) => {
    if (b.refractiveIndex && b.water) {
      ctx.addIssue({ code: "custom", path: ["water"], message: "give either refractiveIndex or water, not both" });
    }
    if (!b.refractiveIndex && (b.wavelengthNm < 200 || b.wavelengthNm > 1100)) {
      ctx.addIssue({
        code: "custom",
        path: ["wavelengthNm"],
        message: "water's index (IAPWS R9-97) is defined from 200 to 1100 nm; give refractiveIndex for other wavelengths",
      });
    }
    if (!b.refractiveIndex && (b.water?.salinityPsu ?? 0) > 0 && (b.wavelengthNm < 400 || b.wavelengthNm > 700)) {
      ctx.addIssue({
        code: "custom",
        path: ["wavelengthNm"],
        message: "salt water (Quan & Fry 1995) is defined from 400 to 700 nm",
      });
    }
    if (b.debyeOrder !== undefined && b.method !== "debye") {
      ctx.addIssue({ code: "custom", path: ["debyeOrder"], message: "debyeOrder needs method \"debye\"" });
    }
    if (b.orders !== undefined && b.method !== "airy" && b.method !== "geometric") {
      ctx.addIssue({ code: "custom", path: ["orders"], message: "orders needs method \"airy\" or \"geometric\"" });
    }
    if (b.method === "airy" && b.orders?.some((p) => p < 2)) {
      ctx.addIssue({ code: "custom", path: ["orders"], message: "Airy theory describes bows: orders p ≥ 2" });
    }
  });

export type ScatterRequest = z.infer<typeof scatterRequestSchema>;
