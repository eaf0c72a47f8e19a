import { z } from "zod";

const number = (min: number, max: number, description: string) => z.number().min(min).max(max).describe(description);

/** The span of moments accepted: astronomy-engine's series are checked over it, and it keeps ΔT's extrapolation small. */
export const MOMENT_RANGE = { fromUtc: "1900-01-01T00:00:00Z", toUtc: "2100-12-31T23:59:59Z" } as const;
const fromMs = Date.parse(MOMENT_RANGE.fromUtc);
const toMs = Date.parse(MOMENT_RANGE.toUtc);

export const placeAndMomentSchema = z
  .object({
    utc: z.iso
      .datetime({ offset: true })
      .describe(`The moment, ISO 8601 with Z or an offset (e.g. 2026-06-21T18:30:00Z), ${MOMENT_RANGE.fromUtc} to ${MOMENT_RANGE.toUtc}`)
      .superRefine((s, ctx) => {
        const ms = Date.parse(s);
        if (!(ms >= fromMs && ms <= toMs)) ctx.addIssue({ code: "custom", message: `utc must lie from ${MOMENT_RANGE.fromUtc} to ${MOMENT_RANGE.toUtc}` });
      }),
    latitudeDeg: number(-90, 90, "Observer's latitude, degrees (north positive)"),
    longitudeDeg: number(-180, 180, "Observer's longitude, degrees (east positive)"),
    heightM: number(-500, 9000, "Observer's height above sea level, m").optional(),
    pressureHpa: number(300, 1100, "Air pressure at the observer, hPa, for refraction (default 1010)").optional(),
    temperatureC: number(-60, 60, "Air temperature at the observer, °C, for refraction (default 10)").optional(),
    belowHorizon: z
      .enum(["error", "black"])
      .default("error")
      .describe("When the source is below the horizon at that moment: error (422) or black (an empty result with a warning)"),
  })
  .strict()
  .describe("A moment and a place: the source's apparent position (with refraction) is computed instead of given");

export type PlaceAndMomentInput = z.infer<typeof placeAndMomentSchema>;
