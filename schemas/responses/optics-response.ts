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

export const scatterResponseSchema = z
  .strictObject({
    ...scatterCommon,
    qExt: z.number().optional().describe("mie: extinction efficiency"),
    qSca: z.number().optional().describe("mie: scattering efficiency"),
    qBack: z.number().optional().describe("mie: backscattering efficiency"),
    g: z.number().optional().describe("mie: asymmetry parameter ⟨cos Θ⟩"),
    debyeOrder: z.number().int().optional().describe("debye: the order p (p − 1 internal reflections)"),
    terms: z.number().int().optional().describe("mie and debye: series terms summed"),
    orders: z.array(z.number().int()).optional().describe("airy and geometric: the Debye orders summed"),
    meta: z.strictObject({
      method: z.enum(["mie", "debye", "airy", "geometric"]),
      units: z.strictObject({ intensityPerpendicular: z.string(), intensityParallel: z.string(), scatteringAngleDeg: z.string() }),
      refractiveIndexSource: z.string(),
      mediumWavelengthNm: z.number(),
      computeMs: z.number(),
      warnings: z.array(z.string()),
    }),
  })
  .describe("POST /v1/scatter: intensities of one drop at one wavelength; which optional fields appear depends on the method");

export type WaterResponse = z.infer<typeof waterResponseSchema>;
export type ScatterResponse = z.infer<typeof scatterResponseSchema>;
