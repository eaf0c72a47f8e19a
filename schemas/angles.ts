import { z } from "zod";

/** An evenly spaced angle range; at most maxCount samples so that a request cannot ask for unbounded arrays. */
export function angleRangeSchema(opts: { what: string; fromDeg: number; toDeg: number; stepDeg: number; maxCount: number }) {
  return z
    .object({
      fromDeg: z.number().min(0).max(180).default(opts.fromDeg).describe(`First ${opts.what}, degrees`),
      toDeg: z.number().min(0).max(180).default(opts.toDeg).describe(`Last ${opts.what}, degrees (inclusive)`),
      stepDeg: z.number().min(0.0001).max(180).default(opts.stepDeg).describe("Step, degrees"),
    })
    .strict()
    .superRefine((r, ctx) => {
      if (r.toDeg < r.fromDeg) {
        ctx.addIssue({ code: "custom", path: ["toDeg"], message: `toDeg must be ≥ fromDeg (${r.fromDeg})` });
        return;
      }
      const count = angleCount(r);
      if (count > opts.maxCount) {
        ctx.addIssue({
          code: "custom",
          path: ["stepDeg"],
          message: `the range gives ${count} samples; at most ${opts.maxCount} are allowed, so stepDeg must be ≥ ${((r.toDeg - r.fromDeg) / (opts.maxCount - 1)).toPrecision(3)}`,
        });
      }
    });
}

export interface AngleRange {
  fromDeg: number;
  toDeg: number;
  stepDeg: number;
}

/** Samples from fromDeg to toDeg inclusive; the last step is kept when it lands within 1e-9 of toDeg. */
export function angleCount(r: AngleRange): number {
  return Math.floor((r.toDeg - r.fromDeg) / r.stepDeg + 1e-9) + 1;
}

export function angleSamples(r: AngleRange): Float64Array {
  const n = angleCount(r);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.min(r.fromDeg + i * r.stepDeg, r.toDeg);
  return out;
}
