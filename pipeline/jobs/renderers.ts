// The renders a job can run, one entry per endpoint: the same schemas and render functions as the synchronous
// routes, so that a job's result is byte for byte the synchronous answer.

import { profileRequestSchema } from "../../schemas/profile.js";
import { stripQuerySchema } from "../../schemas/formats.js";
import { lutQuerySchema, lutRequestSchema } from "../../schemas/lut.js";
import { renderProfile } from "../render/profile-render.js";
import { renderLut } from "../render/lut-render.js";
import { imageQuerySchema, skyRequestSchema, viewRequestSchema } from "../../schemas/view.js";
import { sizeMapQuerySchema, sizeMapRequestSchema, svgQuerySchema } from "../../schemas/figures.js";
import { renderOverlay } from "../render/view-render.js";
import { renderChromaticityFigure, renderSizeMap } from "../render/figure-render.js";
import type { RenderDeps, RenderOutput } from "../render/render-output.js";
import { z } from "zod";
import { sequenceJobBodySchema } from "../../schemas/sequence.js";
import { renderSequence } from "../sequence/render-sequence.js";

export interface JobRenderer {
  body: z.ZodType;
  query: z.ZodType;
  render(body: unknown, query: unknown, deps: RenderDeps): Promise<RenderOutput>;
}

export type RendererRegistry = Record<string, JobRenderer>;

/** Types the render function by its schemas; the registry itself holds the erased form. */
export function defineRenderer<B extends z.ZodType, Q extends z.ZodType>(entry: {
  body: B;
  query: Q;
  render(body: z.output<B>, query: z.output<Q>, deps: RenderDeps): Promise<RenderOutput>;
}): JobRenderer {
  return entry as unknown as JobRenderer;
}

export const builtInRenderers: RendererRegistry = {
  // A job has no Accept header to negotiate with: JSON unless ?format says otherwise.
  profile: defineRenderer({
    body: profileRequestSchema,
    query: stripQuerySchema,
    render: (body, query, deps) => renderProfile(body, query.format ?? "json", query, deps),
  }),
  lut: defineRenderer({ body: lutRequestSchema, query: lutQuerySchema, render: renderLut }),
  view: defineRenderer({ body: viewRequestSchema, query: imageQuerySchema, render: (body, query, deps) => renderOverlay("view", body, query, deps) }),
  sky: defineRenderer({ body: skyRequestSchema, query: imageQuerySchema, render: (body, query, deps) => renderOverlay("sky", body, query, deps) }),
  "figure-chromaticity": defineRenderer({ body: profileRequestSchema, query: svgQuerySchema, render: (body, _query, deps) => renderChromaticityFigure(body, deps) }),
  "figure-size-map": defineRenderer({ body: sizeMapRequestSchema, query: sizeMapQuerySchema, render: (body, query, deps) => renderSizeMap(body, query.format ?? "svg", deps) }),
};

// A span of time (POST /v1/jobs with `sequence`): each frame by the renderers above, packed into one tar archive.
builtInRenderers.sequence = defineRenderer({
  body: sequenceJobBodySchema,
  query: z.object({}).strict(),
  render: (body, _query, deps) => renderSequence(body, builtInRenderers, deps),
});
