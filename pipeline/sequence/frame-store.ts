// Where a sequence job keeps each frame as it finishes, so that a retry after its worker died renders only the
// frames still missing. A kept frame is the frame's whole answer (type, headers, bytes) with its SHA-256: a frame
// whose bytes do not match its hash is rendered again, never trusted.

import { createHash } from "node:crypto";
import { decodeOutput, encodeOutput } from "../jobs/job-types.js";
import type { RenderOutput } from "../render/render-output.js";

export interface FrameStore {
  /** The frames an earlier attempt of this job finished, by index (unreadable ones left out). */
  kept(): Promise<Map<number, RenderOutput>>;
  /** Keeps frame k; resolves once it is stored (or found not worth storing: over the store's byte budget). */
  keep(index: number, output: RenderOutput): Promise<void>;
  /** The archive is stored: the frames are no longer needed. */
  discard(): Promise<void>;
}

const DIGEST_BYTES = 32;

/** A kept frame: its SHA-256 (32 bytes), then the encoded answer. */
export function sealFrame(output: RenderOutput): Buffer {
  const payload = encodeOutput(output);
  return Buffer.concat([createHash("sha256").update(payload).digest(), payload]);
}

/** The frame, or undefined when its bytes do not match the hash kept with them. */
export function openFrame(sealed: Buffer): RenderOutput | undefined {
  if (sealed.length < DIGEST_BYTES + 4) return undefined;
  const payload = sealed.subarray(DIGEST_BYTES);
  if (!createHash("sha256").update(payload).digest().equals(sealed.subarray(0, DIGEST_BYTES))) return undefined;
  return decodeOutput(payload);
}
