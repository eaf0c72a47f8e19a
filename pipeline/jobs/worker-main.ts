// `npm run worker`: a process that renders jobs from the Redis queue (REDIS_URL) with its own kernel worker threads.
// It shares kernels and results with every other process through Redis, and has no HTTP port.

import { loadConfig } from "../config/config.js";
import { createKernelRuntime } from "../kernels/runtime.js";
import { builtInRenderers } from "./renderers.js";
import { startRedisWorker } from "./redis-worker.js";
import { exitOnSignals } from "../process/shutdown.js";
import { within } from "../redis/connection.js";

const config = loadConfig(process.env);
if (!config.redisUrl) {
  console.error("worker: set REDIS_URL; without it `npm start` runs jobs in the API process and needs no worker");
  process.exit(2);
}

const log = (event: Record<string, unknown>) => console.log(JSON.stringify({ time: new Date().toISOString(), pid: process.pid, ...event }));
const runtime = createKernelRuntime(config);
const worker = await startRedisWorker({ config, registry: builtInRenderers, kernels: runtime.kernels, maxTermAngles: config.jobMaxTermAngles, log });
log({ msg: "worker ready", concurrency: config.jobConcurrency, threads: runtime.pool.threads });

// The job in hand finishes if it can within the grace, else it goes back to the queue; a second signal exits at once
// (the job's lease then lapses, and another worker retries it).
exitOnSignals({
  graceMs: config.shutdownGraceMs,
  log,
  stop: async ({ abandonAt, exitAt }) => {
    await worker.close(abandonAt);
    log({ msg: "queue closed; stopping kernel threads" });
    // Ahead of the hard exit: an orderly end exits with 0.
    await within(runtime.close(), exitAt - Date.now() - 250);
  },
});
