import { z } from "zod";

// Ranges follow the water models' stated validity: IAPWS R9-97 0.2–1.1 µm; Kell 1975 density 0–150 °C (extended to
// supercooled drops at −10 °C); Quan & Fry 1995 salinity 0–35 ‰, 400–700 nm, 0–30 °C.
export const waterTemperatureC = z.number().min(-10).max(100).describe("Water temperature, °C");
export const waterSalinityPsu = z.number().min(0).max(35).describe("Salinity, PSU (≈ ‰); 0 for fresh water");

export const waterSchema = z
  .object({
    temperatureC: waterTemperatureC.default(20),
    salinityPsu: waterSalinityPsu.default(0),
  })
  .strict()
  .describe("Drop water: its refractive index follows from IAPWS R9-97 (and Quan & Fry 1995 for salinity)");

export type WaterInput = z.infer<typeof waterSchema>;

export const waterQuerySchema = z
  .object({
    wavelengthNm: z.coerce.number().min(200).max(1100).default(589.3).describe("Vacuum wavelength, nm"),
    temperatureC: z.coerce.number().min(-10).max(100).default(20).describe("Water temperature, °C"),
    salinityPsu: z.coerce.number().min(0).max(35).default(0).describe("Salinity, PSU; above 0 needs 400–700 nm"),
  })
  .strict()
  .superRefine((q, ctx) => {
    if (q.salinityPsu > 0 && (q.wavelengthNm < 400 || q.wavelengthNm > 700)) {
      ctx.addIssue({
        code: "custom",
        path: ["wavelengthNm"],
        message: "salt water (Quan & Fry 1995) is defined from 400 to 700 nm",
        params: { allowed: "400 to 700 nm when salinityPsu > 0" },
      });
    }
  });
