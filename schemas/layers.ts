import { z } from "zod";

/** Formats that hold several layers in one file: OpenEXR's channels named "layer.R" (OpenEXR Technical Introduction, "Layers"). */
export const LAYERED_FORMATS = ["exr"] as const;

export const layersSchema = z
  .enum(["combined", "by-order"])
  .optional()
  .describe(
    "combined (default): the whole light only; by-order: a multi-layer OpenEXR with the light split by scattering order " +
      "(reflection, transmission, primary, secondary, higher: channels reflection.R/G/B …) beside the combined R, G, B, A; format exr only",
  );

/** The query's rule across fields: layers "by-order" needs a format that holds layers. */
export function checkLayersFormat(query: { layers?: "combined" | "by-order"; format: string }, ctx: z.RefinementCtx): void {
  if (query.layers === "by-order" && !(LAYERED_FORMATS as readonly string[]).includes(query.format)) {
    ctx.addIssue({
      code: "custom",
      path: ["layers"],
      message: `layers "by-order" needs format ${LAYERED_FORMATS.join(" or ")} (a multi-layer OpenEXR); format ${query.format} holds one layer: ask layers "combined" or format exr`,
    });
  }
}
