import type { ImageQuery, SkyRequest, ViewRequest } from "../../schemas/view.js";
import { encodeOverlay, prepareSky, prepareView } from "../compute/view.js";
import { headerSafe, jsonOutput, type RenderDeps, type RenderOutput } from "./render-output.js";
import { annotate, resolveOverlayRequest, sourcePositionHeaders } from "../sky/resolve-source.js";

/** A camera view or sky map, or its manifest, as a render output (for the routes and for jobs alike). */
export async function renderOverlay(
  endpoint: "view" | "sky",
  request: ViewRequest | SkyRequest,
  query: ImageQuery,
  deps: RenderDeps,
): Promise<RenderOutput> {
  const resolved = resolveOverlayRequest(request);
  const body = resolved.body;
  const viewDeps = { kernels: deps.kernels, limits: { maxTermAngles: deps.maxTermAngles }, signal: deps.signal };
  deps.onProgress?.(0, "profile");
  const prepared = endpoint === "view" ? await prepareView(body as ViewRequest, query.format, viewDeps) : await prepareSky(body as SkyRequest, query.format, viewDeps);
  annotate(prepared.manifest as Record<string, unknown>, resolved);
  const m = prepared.manifest as { hash: string; scale: { meaning: string; factor: number }; output: { space: string }; computeMs: number; warnings: string[] };
  if (query.part === "manifest") {
    deps.onProgress?.(1, "done");
    return jsonOutput(prepared.manifest, { "x-antisolar-hash": m.hash });
  }
  deps.onProgress?.(0.5, "pixels");
  const file = await encodeOverlay(prepared, query.format);
  deps.onProgress?.(1, "done");
  return {
    contentType: file.contentType,
    body: file.body,
    headers: {
      ...sourcePositionHeaders(resolved.sourcePosition),
      "x-antisolar-hash": m.hash,
      "x-antisolar-space": m.output.space,
      "x-antisolar-scale": headerSafe(`${m.scale.meaning}; factor ${m.scale.factor}`),
      "x-antisolar-compute-ms": String(m.computeMs),
      "x-antisolar-warnings": headerSafe(JSON.stringify(m.warnings)),
    },
  };
}
