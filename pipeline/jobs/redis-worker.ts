// Takes jobs off the BullMQ queue and renders them. A worker that dies mid-job loses its lock after JOB_LOCK_MS;
// another worker's stalled-job check puts the job back in the queue, and it runs again (attempts counts the runs).

import { Worker, type Job } from "bullmq";
import { Redis } from "ioredis";
import type { KernelService } from "../kernels/kernel-service.js";
import type { JobConfig } from "./job-config.js";
import type { RendererRegistry } from "./renderers.js";
import { progressScript, redisKeys, transitionScript } from "./redis-keys.js";
import { encodeOutput, failureMessage, isAbort, renderJob, roundedSeconds, workerName, type JobSpec } from "./job-types.js";
import { throttledProgress } from "../progress/throttled-progress.js";
import type { QueuedJob } from "./redis-backend.js";

export interface WorkerOptions {
  config: JobConfig;
  registry: RendererRegistry;
  kernels: KernelService;
  maxTermAngles: number;
  /** One JSON line per event (job started, done, cancelled, failed). */
  log?: (event: Record<string, unknown>) => void;
}

export interface RunningWorker {
  close(): Promise<void>;
}

/** Times BullMQ may find a job's worker dead before it gives the job up as failed. */
const MAX_STALLED = 3;

export async function startRedisWorker(options: WorkerOptions): Promise<RunningWorker> {
  const { config, registry, kernels, maxTermAngles } = options;
  const log = options.log ?? (() => undefined);
  const keys = redisKeys(config.redisPrefix);
  const redis = new Redis(config.redisUrl, { maxRetriesPerRequest: null });
  const cancels = new Redis(config.redisUrl, { maxRetriesPerRequest: null });
  const ttl = String(config.jobResultTtlS);
  redis.on("error", () => undefined);
  cancels.on("error", () => undefined);

  const transition = async (id: string, state: string, fields: Record<string, string> = {}) =>
    (await redis.eval(transitionScript, 1, keys.record(id), state, keys.events(id), ttl, ...Object.entries(fields).flat())) as string | null;

  const process = async (job: Job<QueuedJob>, _token?: string, signal?: AbortSignal) => {
    const id = job.data.id;
    const state = await transition(id, "running", { startedAt: new Date().toISOString(), worker: workerName() });
    if (state !== "running") {
      log({ msg: "job skipped", id, state });
      return { state };
    }
    const spec = JSON.parse((await redis.hget(keys.record(id), "spec")) ?? "{}") as JobSpec;
    log({ msg: "job started", id, endpoint: spec.endpoint, attempt: job.attemptsStarted });
    const started = performance.now();
    const abort = signal ?? new AbortController().signal;
    // Rate-limited (throttled-progress.ts): at most ten writes a second to Redis per job.
    let firstUpdate = true;
    const progress = throttledProgress(({ fraction, stage, secondsLeft }) => {
      if (firstUpdate) {
        // Where this attempt starts: above 0 when rows of an earlier attempt were kept (a retry after a worker died).
        log({ msg: "job progress", id, attempt: job.attemptsStarted, fraction });
        firstUpdate = false;
      }
      const left = roundedSeconds(secondsLeft);
      redis.eval(progressScript, 1, keys.record(id), String(fraction), stage, keys.events(id), left === null ? "" : String(left)).catch(() => undefined);
    });
    try {
      if ((await redis.exists(keys.result(spec.hash))) === 1) {
        await redis.hset(keys.record(id), "reused", "1");
      } else {
        const output = await renderJob(registry, spec, {
          kernels,
          maxTermAngles,
          signal: abort,
          onProgress: progress.listener,
          saveEachTask: true,
        });
        await redis.set(keys.result(spec.hash), encodeOutput(output), "EX", config.jobResultTtlS);
      }
      const final = await transition(id, "done", { finishedAt: new Date().toISOString(), fraction: "1", stage: "done", secondsLeft: "0" });
      log({ msg: "job done", id, state: final, ms: Math.round(performance.now() - started) });
      return { state: final };
    } catch (error) {
      if (isAbort(error, abort)) {
        log({ msg: "job cancelled", id, ms: Math.round(performance.now() - started) });
        return { state: "cancelled" };
      }
      await transition(id, "failed", { finishedAt: new Date().toISOString(), error: failureMessage(error) });
      log({ msg: "job failed", id, error: String(error) });
      return { state: "failed" };
    } finally {
      progress.stop();
    }
  };

  const worker = new Worker<QueuedJob>(keys.queue, process, {
    connection: { url: config.redisUrl, maxRetriesPerRequest: null },
    prefix: keys.bullPrefix,
    concurrency: config.jobConcurrency,
    lockDuration: config.jobLockMs,
    stalledInterval: config.jobStalledIntervalMs,
    maxStalledCount: MAX_STALLED,
  });
  worker.on("error", (error) => log({ msg: "queue error", error: String(error) }));
  // BullMQ gives a job up when its workers kept dying: the record must say so too.
  worker.on("failed", (job, error) => {
    if (job) void transition(job.data.id, "failed", { finishedAt: new Date().toISOString(), error: `the job was given up: ${error.message}` });
  });

  await cancels.subscribe(keys.cancel);
  cancels.on("message", (_channel: string, id: string) => {
    if (worker.cancelJob(id, "cancelled by the client")) log({ msg: "job cancel requested", id });
  });

  return {
    close: async () => {
      await worker.close();
      cancels.disconnect();
      await redis.quit().catch(() => undefined);
    },
  };
}
