// A sequence job's finished frames in Redis (one hash per job content hash, field = frame index), expiring with the
// job's record, so that a worker taking the job over after its first worker died renders only the missing frames.
// Nothing here is a finished result: the archive alone is stored as the job's result, and the frames are dropped
// once it is.

import type { Redis } from "ioredis";
import { openFrame, sealFrame, type FrameStore } from "../sequence/frame-store.js";
import type { RenderOutput } from "../render/render-output.js";

/**
 * Most bytes of frames kept for one job (our choice): the archive itself is stored in Redis too, so kept frames
 * at most double a sequence's footprint there while it runs; frames past this are rendered again by a retry.
 */
export const MAX_KEPT_FRAME_BYTES = 256 * 2 ** 20;

export function redisFrameStore(
  redis: Redis,
  key: string,
  ttlS: number,
  log: (event: Record<string, unknown>) => void = () => undefined,
  maxBytes = MAX_KEPT_FRAME_BYTES,
): FrameStore {
  let bytes = 0;
  return {
    async kept() {
      const fields = await redis.hgetallBuffer(key);
      const frames = new Map<number, RenderOutput>();
      for (const [field, sealed] of Object.entries(fields)) {
        const output = openFrame(sealed);
        if (!output) continue;
        frames.set(Number(field), output);
        bytes += sealed.length;
      }
      log({ msg: "frames resumed", kept: frames.size });
      return frames;
    },
    async keep(index, output) {
      const sealed = sealFrame(output);
      if (bytes + sealed.length > maxBytes) return;
      bytes += sealed.length;
      await redis.multi().hset(key, String(index), sealed).expire(key, ttlS).exec();
      log({ msg: "frame kept", index });
    },
    async discard() {
      await redis.del(key);
    },
  };
}
