import { z } from "zod";
import { MOMENT_RANGE } from "./place-and-time.js";

/** At most this many frames a job: about 20 minutes of 640 × 360 views on two cores; an archive of a few hundred MB at most. */
export const MAX_SEQUENCE_FRAMES = 400;

const moment = (what: string) =>
  z.iso
    .datetime({ offset: true })
    .describe(`${what}, ISO 8601 with Z or an offset, ${MOMENT_RANGE.fromUtc} to ${MOMENT_RANGE.toUtc}`)
    .superRefine((s, ctx) => {
      const ms = Date.parse(s);
      if (!(ms >= Date.parse(MOMENT_RANGE.fromUtc) && ms <= Date.parse(MOMENT_RANGE.toUtc))) {
        ctx.addIssue({ code: "custom", message: `must lie from ${MOMENT_RANGE.fromUtc} to ${MOMENT_RANGE.toUtc}` });
      }
    });

export const sequenceSchema = z
  .object({
    fromUtc: moment("First frame's moment"),
    toUtc: moment("Last frame's moment"),
    frames: z.number().int().min(2).max(MAX_SEQUENCE_FRAMES).describe(`Frames, evenly spaced in time from fromUtc to toUtc inclusive (2 to ${MAX_SEQUENCE_FRAMES})`),
  })
  .strict()
  .superRefine((s, ctx) => {
    if (Date.parse(s.toUtc) <= Date.parse(s.fromUtc)) ctx.addIssue({ code: "custom", path: ["toUtc"], message: "toUtc must be later than fromUtc" });
  })
  .describe("A span of time rendered as numbered frames; the body's sun.at or moon.at gives the place");

export type Sequence = z.infer<typeof sequenceSchema>;

/** The endpoints a sequence can render: those whose light can be given by a moment and a place. */
export const SEQUENCE_ENDPOINTS = ["profile", "view", "sky", "lut"] as const;

export const sequenceJobBodySchema = z
  .object({
    endpoint: z.enum(SEQUENCE_ENDPOINTS).describe("the render of each frame"),
    body: z.record(z.string(), z.unknown()).default({}).describe("that endpoint's body; its sun.at or moon.at (scenario.sun.at, scenario.moon.at for lut) gives the place"),
    query: z.record(z.string(), z.unknown()).default({}).describe("that endpoint's query options, e.g. {\"format\": \"png\"}"),
    sequence: sequenceSchema,
  })
  .strict();

export type SequenceJobBody = z.infer<typeof sequenceJobBodySchema>;
