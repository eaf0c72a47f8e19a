// What every job backend (in-process or Redis) stores and answers, and the parts they share.

import { canonicalJson } from "../requests/content-hash.js";
import { createHash } from "node:crypto";
import { setMaxListeners } from "node:events";
import type { RenderDeps, RenderOutput } from "../render/render-output.js";
import type { RendererRegistry } from "./renderers.js";
import { ClientError } from "../requests/client-error.js";
import { KERNEL_VERSION } from "../kernels/kernel-service.js";
import { packageVersion } from "../config/resources.js";
import type { JobRecord, JobState } from "../../schemas/responses/job-response.js";

export type { JobRecord, JobState } from "../../schemas/responses/job-response.js";
export const terminalStates: readonly JobState[] = ["done", "failed", "cancelled"];

/** A validated submission: the raw body and query as sent (each worker re-parses them) and their content hash. */
export interface JobSpec {
  endpoint: string;
  body: unknown;
  query: unknown;
  hash: string;
}

export interface JobBackend {
  readonly mode: "in-process" | "redis";
  submit(spec: JobSpec): Promise<JobRecord>;
  get(id: string): Promise<JobRecord | undefined>;
  result(hash: string): Promise<RenderOutput | undefined>;
  /** Marks the job cancelled and aborts its render; a finished job is left as it is. */
  cancel(id: string): Promise<JobRecord | undefined>;
  /** Calls back whenever the job may have changed; returns the unsubscribe function. */
  watch(id: string, onChange: () => void): () => void;
  ready(): Promise<{ ok: boolean; detail: string }>;
  close(): Promise<void>;
}

/** The version is part of the hash, so that a new release never serves an older release's result. */
let version: string | undefined;
export function jobHash(endpoint: string, parsedBody: unknown, parsedQuery: unknown): string {
  version ??= packageVersion();
  const text = canonicalJson({ endpoint, body: parsedBody, query: parsedQuery, version, kernel: KERNEL_VERSION });
  return createHash("sha256").update(text).digest("hex").slice(0, 32);
}

/** Result payload: u32 header length, JSON {contentType, headers}, then the body bytes. */
export function encodeOutput(output: RenderOutput): Buffer {
  const header = Buffer.from(JSON.stringify({ contentType: output.contentType, headers: output.headers }));
  const length = Buffer.alloc(4);
  length.writeUInt32LE(header.length, 0);
  return Buffer.concat([length, header, output.body]);
}

export function decodeOutput(payload: Buffer): RenderOutput {
  const length = payload.readUInt32LE(0);
  const { contentType, headers } = JSON.parse(payload.subarray(4, 4 + length).toString("utf8")) as Omit<RenderOutput, "body">;
  return { contentType, headers, body: Buffer.from(payload.subarray(4 + length)) };
}

export function workerName(): string {
  return `${process.env.HOSTNAME || "local"}:${process.pid}`;
}

/** Progress for clients only rises: a stage reported out of order (or a retried attempt) never moves it back. */
export function risingProgress(current: { fraction: number }, fraction: number): boolean {
  return Number.isFinite(fraction) && fraction > current.fraction;
}

/** Seconds left to a tenth of a second (finer is noise), or null. */
export function roundedSeconds(seconds: number | null): number | null {
  return seconds === null || !Number.isFinite(seconds) ? null : Math.round(seconds * 10) / 10;
}

export function isAbort(error: unknown, signal: AbortSignal): boolean {
  return signal.aborted || (error instanceof Error && (error.name === "AbortError" || /abort/i.test(error.message)));
}

/** Runs one job's render: the endpoint's schemas parse the stored request again, so a worker trusts nothing it reads. */
export function renderJob(registry: RendererRegistry, spec: JobSpec, deps: RenderDeps): Promise<RenderOutput> {
  const renderer = registry[spec.endpoint];
  if (!renderer) throw new Error(`no renderer for endpoint '${spec.endpoint}' in this process`);
  const body = renderer.body.parse(spec.body ?? {});
  const query = renderer.query.parse(spec.query ?? {});
  // Every kernel task of the render listens to the job's signal; dozens at a time are expected, not a leak.
  if (deps.signal) setMaxListeners(0, deps.signal);
  return renderer.render(body, query, {
    ...deps,
    // Stages between kernel computations are checkpoints too: a cancelled job stops at the next one.
    onProgress: (update) => {
      deps.signal?.throwIfAborted();
      deps.onProgress?.(update);
    },
  });
}

/** The message a client sees for a failed job: a ClientError's own sentence, never internals. */
export function failureMessage(error: unknown): string {
  return error instanceof ClientError ? error.message : "internal error while rendering; report the job id";
}
