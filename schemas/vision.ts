import { z } from "zod";

export const visionSchema = z
  .enum(["camera", "eye"])
  .default("camera")
  .describe(
    "camera: colorimetric, any exposure; eye: a human eye adapted to the scene's light level: below 5 cd/m² the CIE 191:2010 mesopic luminance, with the colour fading and shifting to blue as the rods take over",
  );

export const adaptingLuminanceSchema = z
  .number()
  .min(1e-6)
  .max(1e6)
  .optional()
  .describe("Luminance the eye is adapted to, cd/m² (vision eye); default: level ground of 18 % reflectance in the light source's direct light");
