// What every Redis client of the service shares: how soon it reconnects, and how it closes without waiting for a
// Redis that does not answer.

import type { Redis } from "ioredis";

/**
 * ioredis's retryStrategy: the n-th reconnection attempt after n × 200 ms, at most 2 s apart (our choice), so a
 * process is back within about 2 s of Redis (BullMQ's own default grows to 20 s between attempts).
 */
export function reconnectDelayMs(attempt: number): number {
  return Math.min(attempt * 200, 2000);
}

/** Resolves with the work's value, or with undefined after ms (the work goes on unobserved; its failure is ignored). */
export async function within<T>(work: Promise<T>, ms: number): Promise<T | undefined> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  work.catch(() => undefined);
  try {
    return await Promise.race([work, new Promise<undefined>((resolve) => (timer = setTimeout(() => resolve(undefined), ms)))]);
  } catch {
    return undefined;
  } finally {
    clearTimeout(timer);
  }
}

/** Closes a client: QUIT while connected (answers in flight arrive), for at most ms; then the socket is dropped. */
export async function closeRedis(client: Redis, ms = 1000): Promise<void> {
  if (client.status === "ready") await within(client.quit(), ms);
  client.disconnect();
}
