// Kernel packs in Redis, with DiskStore's read/write interface: a pack computed by one process is reused by every
// other process of the deployment. Values carry a SHA-256 of the payload; a damaged value reads as missing.

import { createHash } from "node:crypto";
import { Redis } from "ioredis";

const DIGEST_BYTES = 32;

export class RedisKernelStore {
  readonly folder: string;

  constructor(
    private readonly redis: Redis,
    prefix: string,
    /** Packs not written again for this long expire; Redis's own eviction policy bounds the memory. */
    private readonly ttlS: number,
  ) {
    this.folder = `${prefix}:kernel`;
  }

  /** The Redis key of a pack (DiskStore's file path). */
  pathOf(key: string): string {
    return `${this.folder}:${createHash("sha256").update(key).digest("hex")}`;
  }

  async read(key: string): Promise<Buffer | undefined> {
    let value: Buffer | null;
    try {
      value = await this.redis.getBuffer(this.pathOf(key));
    } catch {
      // Redis away: the kernel is computed here instead.
      return undefined;
    }
    if (!value || value.length < DIGEST_BYTES) return undefined;
    const payload = value.subarray(DIGEST_BYTES);
    return createHash("sha256").update(payload).digest().equals(value.subarray(0, DIGEST_BYTES)) ? Buffer.from(payload) : undefined;
  }

  async write(key: string, payload: Buffer | readonly Buffer[]): Promise<void> {
    const pieces = Buffer.isBuffer(payload) ? [payload] : payload;
    const hash = createHash("sha256");
    for (const piece of pieces) hash.update(piece);
    await this.redis.set(this.pathOf(key), Buffer.concat([hash.digest(), ...pieces]), "EX", this.ttlS);
  }
}

/** A connection for kernel packs that gives up quickly, so that a Redis outage slows renders down but never stops them. */
export function kernelRedis(url: string): Redis {
  const redis = new Redis(url, { maxRetriesPerRequest: 1, commandTimeout: 5000 });
  redis.on("error", () => undefined);
  return redis;
}
