import { z } from "zod";

export const waterResponseSchema = z
  .strictObject({
    n: z.number().describe("real refractive index of water relative to vacuum"),
    nRelativeToAir: z.number().describe("n divided by the index of air: what the scattering code uses for a drop in air"),
    k: z.number().describe("imaginary part (absorption)"),
    source: z.string().describe("the published formulation used"),
    wavelength: z.literal("vacuum").describe("wavelengthNm is a vacuum wavelength"),
    wavelengthNm: z.number(),
  })
  .describe("GET /v1/water: the refractive index of water");

/** JSON has no Infinity: where ray optics diverges (a caustic) the value is null. */
const intensities = z.array(z.number().nullable());

const scatterCommon = {
  scatteringAngleDeg: z.array(z.number()).describe("scattering angles Θ, degrees, 0 = forward"),
  intensityPerpendicular: intensities.describe("|S1|² (van de Hulst's i1), dimensionless, per angle"),
  intensityParallel: intensities.describe("|S2|² (van de Hulst's i2), dimensionless, per angle"),
  degreeOfPolarisation: intensities.describe("(i1 − i2)/(i1 + i2) per angle; null where the intensities diverge"),
  sizeParameter: z.number().describe("x = 2πr/λ in the surrounding medium"),
  refractiveIndex: z.strictObject({ re: z.number(), im: z.number() }).describe("of the drop relative to the surrounding medium"),
};

const scatterMeta = (method: z.ZodType) =>
  z.strictObject({
    method,
    units: z.strictObject({ intensityPerpendicular: z.string(), intensityParallel: z.string(), scatteringAngleDeg: z.string() }),
    refractiveIndexSource: z.string(),
    mediumWavelengthNm: z.number(),
    computeMs: z.number(),
    warnings: z.array(z.string()),
  });

export const scatterResponseSchema = z
  .union([
    z.strictObject({
      ...scatterCommon,
      qExt: z.number().describe("extinction efficiency"),
      qSca: z.number().describe("scattering efficiency"),
      qBack: z.number().describe("backscattering efficiency"),
      g: z.number().describe("asymmetry parameter ⟨cos Θ⟩"),
      terms: z.number().int().describe("Mie series terms summed"),
      meta: scatterMeta(z.literal("mie")),
    }),
    z.strictObject({
      ...scatterCommon,
      debyeOrder: z.number().int().describe("Debye order p (p − 1 internal reflections)"),
      terms: z.number().int(),
      meta: scatterMeta(z.literal("debye")),
    }),
    z.strictObject({
      ...scatterCommon,
      orders: z.array(z.number().int()).describe("Debye orders summed"),
      meta: scatterMeta(z.enum(["airy", "geometric"])),
    }),
  ])
  .describe("POST /v1/scatter: intensities of one drop at one wavelength; the extra fields depend on the method");

export type WaterResponse = z.infer<typeof waterResponseSchema>;
export type ScatterResponse = z.infer<typeof scatterResponseSchema>;
