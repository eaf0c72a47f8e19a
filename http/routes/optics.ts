import { defineRoute, type RouteSpec } from "../route-spec.js";
import { scatterRequestSchema } from "../../schemas/scatter.js";
import { waterQuerySchema } from "../../schemas/water.js";
import { waterIndex } from "../../lib/water/water-index.js";
import { computeScatter, scatterCost } from "../../pipeline/compute/scatter.js";
import { ClientError } from "../../pipeline/requests/client-error.js";
import type { Config } from "../../pipeline/config/config.js";
import type { WaterResponse } from "../../schemas/responses/optics-response.js";

export function opticsRoutes(config: Config): RouteSpec[] {
  return [
    defineRoute({
      method: "GET",
      url: "/v1/water",
      tag: "optics",
      summary: "Refractive index of water at a vacuum wavelength, temperature and salinity",
      description:
        "IAPWS R9-97 with the liquid density at the temperature, plus the Quan & Fry 1995 salinity increment. " +
        "`n` is relative to vacuum; `nRelativeToAir` is what the scattering code uses for a drop in air.",
      query: waterQuerySchema,
      responses: { 200: { description: "the index", json: "Water" }, 400: { description: "a parameter out of range" } },
      handle: async ({ query }): Promise<WaterResponse> => ({ ...waterIndex(query), wavelength: "vacuum", wavelengthNm: query.wavelengthNm }),
    }),
    defineRoute({
      method: "POST",
      url: "/v1/scatter",
      tag: "optics",
      summary: "Scattering by one drop at one wavelength: Lorenz–Mie, a Debye order, Airy theory or ray optics",
      description:
        "`intensityPerpendicular` = |S1|² and `intensityParallel` = |S2|² (van de Hulst's i1 and i2: perpendicular and " +
        "parallel to the scattering plane) in the dimensionless Bohren–Huffman convention at scattering angles Θ (0° = forward). Requests costlier than the synchronous " +
        "budget (Mie terms × angles) are refused with 422.",
      body: scatterRequestSchema,
      responses: {
        200: { description: "intensities per scattering angle", json: "Scatter" },
        400: { description: "a field out of range" },
        422: { description: "valid, but costlier than the synchronous budget" },
      },
      handle: async ({ body }) => {
        const cost = scatterCost(body);
        if (cost.termAngles > config.maxTermAngles) {
          throw new ClientError(
            "too-costly",
            `this request needs about ${cost.termAngles.toExponential(2)} term-angles (${cost.terms} terms × ${cost.angles} angles); ` +
              `the synchronous limit is ${config.maxTermAngles.toExponential(2)}: use fewer angles or a smaller drop`,
            { cost: cost.termAngles, limit: config.maxTermAngles },
          );
        }
        return computeScatter(body);
      },
    }),
  ];
}
