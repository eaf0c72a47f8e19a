// `npm run worker`: a process that renders jobs from the Redis queue (REDIS_URL) with its own kernel worker threads.
// It shares kernels and results with every other process through Redis, and has no HTTP port.

import { loadConfig } from "../config/config.js";
import { createKernelRuntime } from "../kernels/runtime.js";
import { builtInRenderers } from "./renderers.js";
import { startRedisWorker } from "./redis-worker.js";

const config = loadConfig(process.env);
if (!config.redisUrl) {
  console.error("worker: set REDIS_URL; without it `npm start` runs jobs in the API process and needs no worker");
  process.exit(2);
}

const log = (event: Record<string, unknown>) => console.log(JSON.stringify({ time: new Date().toISOString(), pid: process.pid, ...event }));
const runtime = createKernelRuntime(config);
const worker = await startRedisWorker({ config, registry: builtInRenderers, kernels: runtime.kernels, maxTermAngles: config.jobMaxTermAngles, log });
log({ msg: "worker ready", concurrency: config.jobConcurrency, threads: runtime.pool.threads });

let stopping = false;
const shutdown = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  // BullMQ's close waits for the jobs in hand; a second signal (or the orchestrator's kill) cuts it short, and the
  // lock then lapses so that another worker retries the job.
  log({ msg: "shutting down; finishing jobs in hand", signal });
  await worker.close();
  await runtime.close();
  process.exit(0);
};
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));
