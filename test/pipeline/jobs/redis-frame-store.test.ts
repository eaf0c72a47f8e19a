// A sequence job's frames in Redis: kept as they finish, expiring with the job, bounded in bytes, read back only
// when their SHA-256 matches, dropped once the archive is stored. A redis-server of the test's own.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { Redis } from "ioredis";
import { ownRedis, redisServerPresent, type OwnRedis } from "../../helpers/redis-server.js";
import { skipWithout } from "../../helpers/tools.js";
import { redisFrameStore } from "../../../pipeline/jobs/redis-frame-store.js";
import { sealFrame } from "../../../pipeline/sequence/frame-store.js";

const frame = (k: number) => ({ contentType: "image/png", body: Buffer.alloc(1000, k), headers: { "x-antisolar-hash": `h${k}` } });

describe.skipIf(skipWithout(redisServerPresent))("the Redis frame store", () => {
  let server: OwnRedis;
  let redis: Redis;
  beforeAll(async () => {
    server = await ownRedis({ appendOnly: false });
    await server.start();
    redis = new Redis(server.url, { maxRetriesPerRequest: 1 });
  }, 30_000);
  afterAll(async () => {
    redis?.disconnect();
    await server?.dispose();
  });

  it("keeps frames with the job's expiry, within its byte budget, and gives them back to the next attempt", async () => {
    const sealedBytes = sealFrame(frame(0)).length;
    const events: Record<string, unknown>[] = [];
    // Room for two frames: the third is not kept (a retry would render it again).
    const first = redisFrameStore(redis, "t:frames:a", 600, (e) => events.push(e), 2 * sealedBytes);
    expect((await first.kept()).size).toBe(0);
    for (const k of [0, 1, 2]) await first.keep(k, frame(k));
    expect(await redis.hlen("t:frames:a")).toBe(2);
    const ttl = await redis.ttl("t:frames:a");
    expect(ttl).toBeGreaterThan(590);
    expect(ttl).toBeLessThanOrEqual(600);
    expect(events.filter((e) => e.msg === "frame kept").map((e) => e.index)).toEqual([0, 1]);

    // A damaged frame is left out, not trusted.
    const damaged = Buffer.from((await redis.hgetBuffer("t:frames:a", "1"))!);
    damaged[damaged.length - 1] ^= 1;
    await redis.hset("t:frames:a", "1", damaged);
    const retry = redisFrameStore(redis, "t:frames:a", 600, (e) => events.push(e));
    const kept = await retry.kept();
    expect([...kept.keys()]).toEqual([0]);
    expect(kept.get(0)).toEqual(frame(0));
    expect(events.at(-1)).toEqual({ msg: "frames resumed", kept: 1 });

    await retry.discard();
    expect(await redis.exists("t:frames:a")).toBe(0);
  });
});
