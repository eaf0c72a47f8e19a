import type { KernelService } from "../kernels/kernel-service.js";

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
  /** Progress as a fraction in [0, 1] with a stage name. */
  onProgress?: (fraction: number, stage: string) => void;
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
