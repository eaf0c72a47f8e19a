import { z } from "zod";
import { CANTING_SD_DEG } from "../lib/drops/shape/canting.js";

const number = (min: number, max: number, description: string) => z.number().min(min).max(max).describe(description);

const canting = number(0, 20, "Standard deviation of the drops' canting (tilt of their axis), degrees, in each of two vertical planes").default(CANTING_SD_DEG);

/** Shortest axis over longest the flattened-drop engine serves (the equilibrium shape of a 6 mm drop is 0.64). */
export const MIN_AXIS_RATIO = 0.6;

export const dropShapeSchema = z
  .discriminatedUnion("kind", [
    z.object({ kind: z.literal("sphere") }).strict(),
    z
      .object({
        kind: z.literal("equilibrium"),
        cantingSdDeg: canting,
      })
      .strict()
      .describe("Each drop takes the equilibrium shape of its size (Beard & Chuang 1987); symmetry axis vertical, canted"),
    z
      .object({
        kind: z.literal("spheroid"),
        axisRatio: number(MIN_AXIS_RATIO, 1, "Vertical over horizontal axis of every drop (oblate spheroids), for studies"),
        cantingSdDeg: canting,
      })
      .strict(),
  ])
  .describe(
    "Drop shape: sphere (the default), equilibrium (flattened by their fall, from 150 µm radius up; smaller drops stay spheres) or spheroid of a fixed axis ratio",
  );

export type DropShape = z.infer<typeof dropShapeSchema>;

export const arcPositionSchema = number(
  0,
  180,
  "Where along the bow the profile is taken: angle around the antisolar point from the bow's highest point (0 = top, 90 = level with the antisolar point, 180 = lowest)",
).optional();

/** True for a drop shape that is not a sphere. */
export function isFlattened(shape: DropShape | undefined): boolean {
  return shape !== undefined && shape.kind !== "sphere";
}

/**
 * Views and sky maps draw flattened drops, but not with calm water: its reflection bow is lit from below the
 * horizon, which for flattened drops is another set of profiles (the sun's elevation mirrored), not served yet.
 */
export function refuseFlattenedDropsOnWater(body: { scenario: { drops: { shape?: DropShape } }; waterSurface?: unknown }, ctx: z.RefinementCtx): void {
  if (body.waterSurface !== undefined && isFlattened(body.scenario.drops.shape)) {
    ctx.addIssue({
      code: "custom",
      path: ["waterSurface"],
      message: `water (calm or rough) is drawn with spherical drops only: leave waterSurface out with drops.shape "${body.scenario.drops.shape!.kind}", or use shape {"kind":"sphere"}`,
    });
  }
}
