// The shared kernel store against a real redis-server of the test's own that is killed, restarted and paused:
// reads and writes never wait for a Redis that is away (the local folder stands in), and Redis is used again
// once it is back, without a restart of the process.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Redis } from "ioredis";
import { DiskStore } from "../../../pipeline/kernels/disk-store.js";
import { kernelRedis, RedisKernelStore, KERNEL_REDIS_BREAKER } from "../../../pipeline/kernels/redis-kernel-store.js";
import { ownRedis, redisServerPresent, type OwnRedis } from "../../helpers/redis-server.js";
import { skipWithout } from "../../helpers/tools.js";

let server: OwnRedis;
let folder = "";
let client: Redis;
let direct: Redis;
let store: RedisKernelStore;

async function until(what: string, check: () => Promise<boolean>, timeoutMs = 15_000): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe.skipIf(skipWithout(redisServerPresent))("the Redis kernel store while Redis fails", () => {
  beforeAll(async () => {
    server = await ownRedis({ appendOnly: false });
    await server.start();
    folder = await mkdtemp(join(tmpdir(), "antisolar-kernel-faults-"));
    client = kernelRedis(server.url);
    direct = new Redis(server.url, { maxRetriesPerRequest: 0, retryStrategy: () => 50 });
    direct.on("error", () => undefined);
    store = new RedisKernelStore(client, "faults", 60, new DiskStore(folder));
    await until("the kernel connection", async () => client.status === "ready");
  }, 20_000);

  afterAll(async () => {
    client?.disconnect();
    direct?.disconnect();
    await server?.dispose();
    if (folder) await rm(folder, { recursive: true, force: true });
  });

  it("keeps packs in Redis while it answers", async () => {
    await store.write("a", Buffer.from("pack a"));
    expect((await store.read("a"))?.toString()).toBe("pack a");
    expect(await direct.exists(store.pathOf("a"))).toBe(1);
  });

  it("uses the local folder while Redis is killed, and Redis again once it is back (empty, no persistence)", async () => {
    await server.kill();
    await until("the client to notice", async () => client.status !== "ready");
    // Nothing waits: a pack only Redis had reads as missing, a new pack goes to the folder and reads back from it.
    expect(await store.read("a")).toBeUndefined();
    await store.write("b", Buffer.from("pack b"));
    expect((await store.read("b"))?.toString()).toBe("pack b");
    expect(store.breaker.state).toBe("closed");

    await server.start();
    await until("the kernel connection to come back by itself", async () => client.status === "ready");
    await store.write("c", Buffer.from("pack c"));
    expect(await direct.exists(store.pathOf("c"))).toBe(1);
    // Packs written during the outage are still found (Redis misses them, the folder has them).
    expect((await store.read("b"))?.toString()).toBe("pack b");
  }, 30_000);

  it("stops asking a Redis that hangs after three timeouts, and asks again after the open time", async () => {
    server.pause();
    try {
      const reads = await Promise.all([store.read("c"), store.read("c"), store.read("c")]);
      expect(reads).toEqual([undefined, undefined, undefined]);
      expect(store.breaker.state).toBe("open");
      // Open: answered from the folder without a command, while Redis still hangs.
      expect((await store.read("b"))?.toString()).toBe("pack b");
    } finally {
      server.resume();
    }
    await until("the breaker's open time to pass", async () => store.breaker.state === "half-open", KERNEL_REDIS_BREAKER.openMs + 5000);
    expect((await store.read("c"))?.toString()).toBe("pack c");
    expect(store.breaker.state).toBe("closed");
  }, 30_000);
});
