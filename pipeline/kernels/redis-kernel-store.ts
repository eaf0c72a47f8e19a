// Kernel packs in Redis, with DiskStore's read/write interface: a pack computed by one process is reused by every
// other process of the deployment. Values carry a SHA-256 of the payload; a damaged value reads as missing.
// Redis is a cache here: while it is away or slow, reads miss and writes are dropped at once (the connection
// does not queue commands, each has a short timeout, and a circuit breaker stops asking after a few failures), and
// the local disk store, when there is one, takes Redis's place, so renders go on at their speed without Redis.

import { createHash } from "node:crypto";
import { Redis } from "ioredis";
import { CircuitBreaker, type BreakerSettings } from "../redis/circuit-breaker.js";
import type { DiskStore } from "./disk-store.js";

const DIGEST_BYTES = 32;

/**
 * Our choices, not measured optima: a pack (~70 kB) comes back from a healthy Redis on loopback or in the same
 * cluster in well under a millisecond, so 500 ms means Redis is stuck; a connection attempt gets 1 s; three
 * failures in a row stop all pack traffic to Redis for 5 s, after which one trial call decides.
 */
export const KERNEL_REDIS_TIMEOUTS = { commandMs: 500, connectMs: 1000 } as const;
export const KERNEL_REDIS_BREAKER: BreakerSettings = { failuresToOpen: 3, openMs: 5000 };

export class RedisKernelStore {
  readonly folder: string;
  readonly breaker: CircuitBreaker;

  constructor(
    private readonly redis: Redis,
    prefix: string,
    /** Packs not written again for this long expire; Redis's own eviction policy bounds the memory. */
    private readonly ttlS: number,
    /** Local packs (CACHE_DIR) read when Redis misses or is away, and written while Redis is away. */
    private readonly fallback?: Pick<DiskStore, "read" | "write">,
    breaker: BreakerSettings = KERNEL_REDIS_BREAKER,
  ) {
    this.folder = `${prefix}:kernel`;
    this.breaker = new CircuitBreaker(breaker);
  }

  /** The Redis key of a pack (DiskStore's file path). */
  pathOf(key: string): string {
    return `${this.folder}:${createHash("sha256").update(key).digest("hex")}`;
  }

  /** A disconnected client is skipped without a call (the breaker decides about a connected one that fails). */
  private connected(): boolean {
    return this.redis.status === "ready";
  }

  async read(key: string): Promise<Buffer | undefined> {
    const value = this.connected() ? await this.breaker.run(() => this.redis.getBuffer(this.pathOf(key)), undefined) : undefined;
    const payload = value ? verified(value) : undefined;
    return payload ?? this.fallback?.read(key);
  }

  async write(key: string, payload: Buffer | readonly Buffer[]): Promise<void> {
    if (this.connected()) {
      const pieces = Buffer.isBuffer(payload) ? [payload] : payload;
      const hash = createHash("sha256");
      for (const piece of pieces) hash.update(piece);
      const value = Buffer.concat([hash.digest(), ...pieces]);
      if (await this.breaker.run(() => this.redis.set(this.pathOf(key), value, "EX", this.ttlS).then(() => true), false)) return;
    }
    await this.fallback?.write(key, payload);
  }
}

function verified(value: Buffer): Buffer | undefined {
  if (value.length < DIGEST_BYTES) return undefined;
  const payload = value.subarray(DIGEST_BYTES);
  return createHash("sha256").update(payload).digest().equals(value.subarray(0, DIGEST_BYTES)) ? Buffer.from(payload) : undefined;
}

/**
 * A connection for kernel packs that never waits for Redis: no offline queue (a command while disconnected fails at
 * once), no retries, short timeouts. It reconnects by itself (ioredis's default back-off, at most 2 s apart).
 */
export function kernelRedis(url: string): Redis {
  const redis = new Redis(url, {
    maxRetriesPerRequest: 0,
    enableOfflineQueue: false,
    commandTimeout: KERNEL_REDIS_TIMEOUTS.commandMs,
    connectTimeout: KERNEL_REDIS_TIMEOUTS.connectMs,
  });
  redis.on("error", () => undefined);
  return redis;
}
