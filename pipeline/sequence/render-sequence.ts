// A span of time as numbered frames: each frame is the single render at its moment (same schemas, same render
// functions, so byte for byte the same), packed with a manifest into one tar archive (tar-stream).

import { createHash } from "node:crypto";
import { pack } from "tar-stream";
import type { SequenceJobBody } from "../../schemas/sequence.js";
import type { RendererRegistry } from "../jobs/renderers.js";
import type { RenderDeps, RenderOutput } from "../render/render-output.js";
import { ClientError } from "../requests/client-error.js";
import { parseOrThrow } from "../requests/parse-request.js";
import { SequenceProgress } from "../progress/sequence-progress.js";

type Json = Record<string, unknown>;

/** The frames' moments, evenly spaced from fromUtc to toUtc inclusive, as ISO strings (UTC). */
export function frameMoments(sequence: SequenceJobBody["sequence"]): string[] {
  const from = Date.parse(sequence.fromUtc);
  const to = Date.parse(sequence.toUtc);
  return Array.from({ length: sequence.frames }, (_, k) => new Date(Math.round(from + ((to - from) * k) / (sequence.frames - 1))).toISOString());
}

/** Where the body holds the light's `at`: sun.at or moon.at, in the scenario for textures. */
function atHolder(endpoint: SequenceJobBody["endpoint"], body: Json): { path: string; holder: Json } {
  const base = endpoint === "lut" ? ((body.scenario ?? {}) as Json) : body;
  const prefix = endpoint === "lut" ? "scenario." : "";
  for (const source of ["moon", "sun"]) {
    const light = base[source] as Json | undefined;
    if (light && typeof light.at === "object" && light.at !== null) return { path: `${prefix}${source}.at`, holder: light.at as Json };
  }
  throw new ClientError("invalid-request", `body field 'body.${prefix}sun.at' (or ${prefix}moon.at) is missing: a sequence needs a place, given with a moment that each frame replaces`, {
    field: `body.${prefix}sun.at`,
    allowed: "an object { utc, latitudeDeg, longitudeDeg }",
  });
}

/** The body of frame k: the job's body with the moment replaced; frames below the horizon are black, not errors. */
export function frameBody(job: SequenceJobBody, utc: string): Json {
  const body = structuredClone(job.body) as Json;
  const { holder } = atHolder(job.endpoint, body);
  holder.utc = utc;
  holder.belowHorizon = "black";
  return body;
}

function extensionOf(contentType: string): string {
  if (contentType.startsWith("application/json")) return "json";
  if (contentType === "image/png") return "png";
  if (contentType === "image/x-exr") return "exr";
  if (contentType === "image/vnd.radiance") return "hdr";
  if (contentType.startsWith("image/svg+xml")) return "svg";
  return "bin";
}

function positionOf(output: RenderOutput): unknown {
  const header = output.headers["x-antisolar-source-position"];
  if (header) return JSON.parse(header);
  // JSON answers carry it inside: meta.sourcePosition (profiles) or sourcePosition (manifests).
  const json = JSON.parse(output.body.toString("utf8")) as { meta?: { sourcePosition?: unknown }; sourcePosition?: unknown; manifest?: { sourcePosition?: unknown } };
  return json.meta?.sourcePosition ?? json.sourcePosition ?? json.manifest?.sourcePosition ?? null;
}

async function tarOf(files: { name: string; body: Buffer }[]): Promise<Buffer> {
  const archive = pack();
  const chunks: Buffer[] = [];
  archive.on("data", (c: unknown) => chunks.push(c as Buffer));
  const done = new Promise<void>((resolve, reject) => {
    archive.on("end", resolve);
    archive.on("error", reject);
  });
  // A fixed mtime: the same sequence gives the same archive.
  for (const f of files) archive.entry({ name: f.name, size: f.body.length, mtime: new Date(0) }, f.body);
  archive.finalize();
  await done;
  return Buffer.concat(chunks);
}

/** Renders every frame with the endpoint's own renderer and packs them with manifest.json. */
export async function renderSequence(job: SequenceJobBody, registry: RendererRegistry, deps: RenderDeps): Promise<RenderOutput> {
  const renderer = registry[job.endpoint];
  const moments = frameMoments(job.sequence);
  const place = atHolder(job.endpoint, job.body as Json).path;
  const query = parseOrThrow(renderer.query, job.query, "body", ["query"]);
  const files: { name: string; body: Buffer }[] = [];
  const frames: unknown[] = [];
  const digits = String(moments.length).length;
  const progress = new SequenceProgress(moments.length, deps.onProgress);
  // Frames an earlier attempt of this job finished (its worker died): the same bytes as rendering them again.
  const kept = (await deps.frames?.kept()) ?? new Map<number, RenderOutput>();
  for (let k = 0; k < moments.length; k++) {
    deps.signal?.throwIfAborted();
    let output = kept.get(k);
    if (output) progress.keptFrame(k);
    else {
      progress.start(k);
      const body = parseOrThrow(renderer.body, frameBody(job, moments[k]), "body", ["body"]);
      output = await renderer.render(body, query, { ...deps, frames: undefined, onProgress: (update) => progress.inner(update.fraction) });
      progress.finish();
      await deps.frames?.keep(k, output);
    }
    const name = `frame-${String(k + 1).padStart(Math.max(4, digits), "0")}.${extensionOf(output.contentType)}`;
    files.push({ name, body: output.body });
    frames.push({ index: k, file: name, utc: moments[k], sourcePosition: positionOf(output), sha256: createHash("sha256").update(output.body).digest("hex") });
  }
  const manifest = {
    endpoint: job.endpoint,
    place: { field: place, ...(atHolder(job.endpoint, job.body as Json).holder as Json), utc: undefined },
    sequence: job.sequence,
    belowHorizon: "black: a frame whose light is below the horizon is rendered black, with a warning",
    frames,
  };
  files.push({ name: "manifest.json", body: Buffer.from(JSON.stringify(manifest, null, 2)) });
  progress.done();
  return { contentType: "application/x-tar", body: await tarOf(files), headers: { "x-antisolar-frames": String(moments.length) } };
}
