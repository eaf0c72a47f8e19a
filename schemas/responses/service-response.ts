import { z } from "zod";

export const healthResponseSchema = z
  .strictObject({
    status: z.literal("ok"),
    uptimeS: z.number().int().min(0).describe("seconds since the process started"),
  })
  .describe("GET /healthz: the process is alive");

export const readyResponseSchema = z
  .strictObject({
    status: z.literal("ready"),
    jobs: z.enum(["in-process", "redis"]).describe("where background jobs run"),
    detail: z.string().describe("what was checked, for people"),
  })
  .describe("GET /readyz: the dependencies answer");

export type HealthResponse = z.infer<typeof healthResponseSchema>;
export type ReadyResponse = z.infer<typeof readyResponseSchema>;
