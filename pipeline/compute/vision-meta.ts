import type { EyeAdaptation } from "../../lib/colour/low-light-vision.js";
import { SCOTOPIC_CHROMATICITY } from "../../lib/colour/low-light-vision.js";
import type { z } from "zod";
import type { visionMetaSchema } from "../../schemas/responses/light-source-response.js";

export type VisionMeta = z.infer<typeof visionMetaSchema>;

/** What an answer states about the vision it was rendered for. */
export function visionMeta(eye: EyeAdaptation | undefined): VisionMeta {
  if (!eye) return { mode: "camera" as const, note: "colorimetric: CIE XYZ of the light, as a camera records it" };
  const round = (v: number) => Number(v.toPrecision(6));
  return {
    mode: "eye" as const,
    adaptingLuminanceCdPerM2: round(eye.adaptingPhotopicCdPerM2),
    adaptingScotopicCdPerM2: round(eye.adaptingScotopicCdPerM2),
    adaptationCoefficientM: round(eye.m),
    coneShare: round(eye.coneShare),
    regime: eye.m >= 1 ? "photopic (as the camera)" : eye.m <= 0 ? "scotopic (rods only: no colour)" : "mesopic",
    model:
      "luminance: CIE 191:2010 mesopic (MES2) at the adapting field's m; colour: the cones' share keeps the colour, the rods' share is shown " +
      `at chromaticity (${SCOTOPIC_CHROMATICITY.x}, ${SCOTOPIC_CHROMATICITY.y}) (Jensen et al. 2001)`,
  };
}
