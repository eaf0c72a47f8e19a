import { z } from "zod";

export const orderLayersManifestSchema = z
  .strictObject({
    kind: z.literal("by-order"),
    channels: z.array(z.string()).describe("every channel of the file, in the file's (alphabetical) order"),
    layers: z.array(z.strictObject({ name: z.string(), channels: z.array(z.string()), meaning: z.string() })),
    sum: z.string().describe("how the layers add up to the combined channels"),
    model: z.string(),
  })
  .describe("layers=by-order: the layers of the multi-layer OpenEXR, by scattering order");

export type OrderLayersManifest = z.infer<typeof orderLayersManifestSchema>;
