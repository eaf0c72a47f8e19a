import { z } from "zod";

export const stripQuerySchema = z
  .object({
    format: z.enum(["json", "png", "png16", "svg"]).optional().describe("Output file; wins over the Accept header (png16 = 16-bit PNG; svg = labelled figure)"),
    height: z.coerce.number().int().min(1).max(4096).default(32).describe("PNG strip height in pixels"),
    bitDepth: z.coerce
      .number()
      .int()
      .refine((v) => v === 8 || v === 16, { message: "bitDepth must be 8 or 16" })
      .optional()
      .describe("PNG bits per channel: 8 or 16 (default 8; 16 with format=png16)"),
  })
  .strict();
