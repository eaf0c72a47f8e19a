import { z } from "zod";

/** meta.shape of a profile: which drop shape was modelled, how, and where on the bow (pipeline/compute/drop-shape-plan.ts). */
export const shapeMetaSchema = z
  .strictObject({
    model: z.string().describe('"sphere", or the flattened-drop model and its source'),
    default: z.string().describe("what the service does when drops.shape is absent, and why"),
    note: z.string().optional().describe("about arcPositionDeg: ignored for spheres, or the side taken when absent"),
    engine: z.string().optional(),
    accuracy: z.string().optional().describe("measured agreement with the checks, and where they are"),
    flattenedRadii: z
      .strictObject({ fromUm: z.number(), toUm: z.number(), nodes: z.number().int(), axisRatioFrom: z.number(), axisRatioTo: z.number() })
      .nullable()
      .optional()
      .describe("the radius nodes served as flattened drops and their axis ratios (vertical over horizontal)"),
    shapesTraced: z
      .strictObject({ shapes: z.number().int(), deformationStep: z.number().nullable(), upToRadiusUm: z.number().nullable() })
      .optional()
      .describe("how many drop shapes were traced: one per radius node, or fewer where radii up to upToRadiusUm share shape nodes deformationStep apart in 1 − axis ratio"),
    cantingSdDeg: z.number().optional(),
    cantingSource: z.string().optional(),
    arcPositionDeg: z.number().optional().describe("the arc position used (rounded as the kernel rows are)"),
    sunElevationDeg: z.number().optional().describe("the sun's elevation used (rounded as the kernel rows are)"),
    quantisation: z.string().optional(),
    spheres: z.string().optional().describe("which small drops stay spheres, and why"),
  })
  .describe("drop shape: sphere or flattened, with the axis ratios used and the place on the bow");

export type ShapeMeta = z.infer<typeof shapeMetaSchema>;
