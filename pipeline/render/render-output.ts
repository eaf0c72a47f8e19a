import type { KernelService } from "../kernels/kernel-service.js";
import type { ProgressListener } from "../progress/progress-meter.js";
import type { FrameStore } from "../sequence/frame-store.js";

/** A finished render: the bytes a client receives, with their type and the headers that describe them. */
export interface RenderOutput {
  contentType: string;
  body: Buffer;
  headers: Record<string, string>;
}

export interface RenderDeps {
  kernels: KernelService;
  /** Largest Mie cost allowed (terms × angles); Infinity for background jobs. */
  maxTermAngles: number;
  signal?: AbortSignal;
  /** Progress as it is measured (pipeline/progress/): fraction in [0, 1], never falling; stage; seconds left. */
  onProgress?: ProgressListener;
  /** Keep kernel rows in the second tier as each task ends (background jobs: a retried job resumes from them). */
  saveEachTask?: boolean;
  /** Sequences: where each finished frame is kept, so that a retried job renders only the frames still missing. */
  frames?: FrameStore;
}

export function jsonOutput(value: unknown, headers: Record<string, string> = {}): RenderOutput {
  return { contentType: "application/json; charset=utf-8", body: Buffer.from(JSON.stringify(value)), headers };
}

/** HTTP header values must be printable ASCII. */
export function headerSafe(text: string): string {
  return text.replace(/[^\x20-\x7e]/g, "?");
}

/** The same output as a later cache hit sees it: JSON bodies say `"cache":"hit"` in their meta. */
export function asCacheHit(output: RenderOutput): RenderOutput {
  if (!output.contentType.startsWith("application/json")) return output;
  const text = output.body.toString("utf8");
  const at = text.lastIndexOf('"cache":"miss"');
  if (at < 0) return output;
  return { ...output, body: Buffer.from(`${text.slice(0, at)}"cache":"hit"${text.slice(at + '"cache":"miss"'.length)}`) };
}
