import { z } from "zod";

const number = (min: number, max: number, description: string) => z.number().min(min).max(max).describe(description);

/** The air between the light source and the rain: the slant path's extinction. */
export const atmosphereSchema = z
  .object({
    attenuate: z
      .enum(["auto", "always", "never"])
      .default("auto")
      .describe("Slant-path extinction: auto applies it to top-of-atmosphere spectra only"),
    pressureHpa: number(300, 1100, "Surface pressure, hPa (scales Rayleigh depth)").default(1013.25),
    angstromBeta: number(0, 2, "Ångström turbidity β (aerosol depth at 1 µm)").default(0.05),
    angstromAlpha: number(0, 4, "Ångström exponent α").default(1.3),
  })
  .strict()
  .default({ attenuate: "auto", pressureHpa: 1013.25, angstromBeta: 0.05, angstromAlpha: 1.3 });
