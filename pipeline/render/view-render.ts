import type { ImageQuery, SkyRequest, ViewRequest } from "../../schemas/view.js";
import { encodeOverlay, prepareSky, prepareView } from "../compute/view.js";
import { headerSafe, jsonOutput, type RenderDeps, type RenderOutput } from "./render-output.js";
import { PROFILE_STAGES } from "../compute/profile.js";
import { ProgressMeter } from "../progress/progress-meter.js";
import { COST_NS } from "../progress/work-costs.js";
import { ORDER_LAYERS } from "../../lib/bow/scattering-orders.js";
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
  // Counted only when somebody listens (a job), as for profiles.
  const progress = deps.onProgress ? new ProgressMeter([...PROFILE_STAGES, "pixels"], deps.onProgress) : undefined;
  if (progress && query.part !== "manifest") {
    const { widthPx, heightPx } = endpoint === "view" ? (body as ViewRequest).camera : (body as SkyRequest);
    // By order, the image is drawn once for the whole light and once per named order.
    progress.plan("pixels", widthPx * heightPx * COST_NS.overlayPixel * (query.layers === "by-order" ? 1 + ORDER_LAYERS.length : 1));
  }
  const viewDeps = { kernels: deps.kernels, limits: { maxTermAngles: deps.maxTermAngles }, signal: deps.signal, progress, saveEachTask: deps.saveEachTask };
  const layers = query.layers ?? "combined";
  const prepared = endpoint === "view" ? await prepareView(body as ViewRequest, query.format, viewDeps, layers) : await prepareSky(body as SkyRequest, query.format, viewDeps, layers);
  annotate(prepared.manifest, resolved);
  const m = prepared.manifest;
  if (query.part === "manifest") {
    progress?.done();
    return jsonOutput(prepared.manifest, { "x-antisolar-hash": m.hash });
  }
  const file = await encodeOverlay(prepared, query.format);
  progress?.complete("pixels");
  progress?.done();
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
