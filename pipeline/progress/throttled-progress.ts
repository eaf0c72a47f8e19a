// Progress for a job record: every rise of a percent or more goes out at once, smaller changes within half a second,
// and never more than ten updates a second, so that a render with thousands of row updates does not flood the
// store (Redis) or the event streams.

import type { ProgressListener, ProgressUpdate } from "./progress-meter.js";

/** Longest a change waits before it is published (the "at least every 0.5 s"). */
export const MAX_DELAY_MS = 500;
/** A rise this large is published without waiting for MAX_DELAY_MS. */
export const PROMPT_STEP = 0.01;
/** Shortest time between two publications: at most ten a second. */
export const MIN_INTERVAL_MS = 100;

export interface ThrottledProgress {
  listener: ProgressListener;
  /** Drops what is pending and stops the timer: the job has ended, and its final state says the rest. */
  stop(): void;
}

export function throttledProgress(publish: (update: ProgressUpdate) => void, now: () => number = () => performance.now()): ThrottledProgress {
  let last: { fraction: number; stage: string; atMs: number } = { fraction: -1, stage: "", atMs: -Infinity };
  let pending: ProgressUpdate | undefined;
  let timer: NodeJS.Timeout | undefined;

  const send = () => {
    if (timer) clearTimeout(timer);
    timer = undefined;
    if (!pending) return;
    const update = pending;
    pending = undefined;
    last = { fraction: update.fraction, stage: update.stage, atMs: now() };
    publish(update);
  };

  const listener: ProgressListener = (update) => {
    pending = update;
    const sinceMs = now() - last.atMs;
    const prompt = update.fraction - last.fraction >= PROMPT_STEP || update.stage !== last.stage || update.fraction >= 1;
    const waitMs = Math.max(0, (prompt ? MIN_INTERVAL_MS : MAX_DELAY_MS) - sinceMs);
    if (waitMs === 0) return send();
    if (timer) clearTimeout(timer);
    timer = setTimeout(send, waitMs);
    timer.unref?.();
  };

  return {
    listener,
    stop: () => {
      if (timer) clearTimeout(timer);
      timer = undefined;
      pending = undefined;
    },
  };
}
