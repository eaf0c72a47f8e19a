// A redis-server of our own on a free loopback port, in its own folder, that a fault test or the outage benchmark may
// kill (SIGKILL), pause (SIGSTOP) and start again on the same port and folder. Never a shared Redis.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Redis } from "ioredis";
import { freePort } from "./free-port.js";

export const redisServerPresent = spawnSync("redis-server", ["--version"]).error === undefined;

export interface OwnRedis {
  url: string;
  port: number;
  folder: string;
  /** Starts the server (again), and resolves once it answers PING. */
  start(): Promise<void>;
  /** SIGKILL: no shutdown save; with the append-only file, what was written (fsync'd) is what comes back. */
  kill(): Promise<void>;
  pause(): void;
  resume(): void;
  /** Kills the server and removes its folder. */
  dispose(): Promise<void>;
}

export async function ownRedis(options: { appendOnly: boolean }): Promise<OwnRedis> {
  const port = await freePort();
  const folder = await mkdtemp(join(tmpdir(), "antisolar-redis-"));
  const url = `redis://127.0.0.1:${port}`;
  // appendfsync always, so that the outcome never depends on when the last fsync happened. SIGKILL of the process
  // alone loses nothing with everysec either (what Redis wrote is in the operating system's cache; deploy/README.md).
  const persistence = options.appendOnly ? ["--appendonly", "yes", "--appendfsync", "always"] : ["--appendonly", "no"];
  let server: ChildProcess | undefined;
  const running = () => server !== undefined && server.exitCode === null && server.signalCode === null;
  const self: OwnRedis = {
    url,
    port,
    folder,
    async start() {
      // One server per port: a second start while one runs would fail to bind and lose track of the first.
      if (running()) throw new Error(`redis-server on port ${port} is already running`);
      server = spawn("redis-server", ["--bind", "127.0.0.1", "--port", String(port), "--dir", folder, "--save", "", ...persistence], { stdio: "ignore" });
      const probe = new Redis(url, { lazyConnect: true, maxRetriesPerRequest: 0, retryStrategy: () => 50 });
      probe.on("error", () => undefined);
      try {
        for (let k = 0; k < 200; k++) {
          if ((await probe.ping().catch(() => "")) === "PONG") return;
          await new Promise((r) => setTimeout(r, 50));
        }
        throw new Error(`redis-server on port ${port} did not answer within 10 s`);
      } finally {
        probe.disconnect();
      }
    },
    async kill() {
      if (!running()) return;
      const exited = new Promise((r) => server!.once("exit", r));
      server!.kill("SIGKILL");
      await exited;
    },
    pause: () => void server?.kill("SIGSTOP"),
    resume: () => void server?.kill("SIGCONT"),
    async dispose() {
      if (running()) server!.kill("SIGCONT");
      await self.kill();
      await rm(folder, { recursive: true, force: true });
    },
  };
  process.once("exit", () => {
    if (running()) server!.kill("SIGKILL");
  });
  return self;
}
