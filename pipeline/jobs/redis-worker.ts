// Takes jobs off the BullMQ queue and renders them. A worker that dies mid-job loses its lock after JOB_LOCK_MS;
// another worker's stalled-job check puts the job back in the queue, and it runs again (attempts counts the runs).
// While Redis is away a worker goes on computing the job in hand and stores the result once Redis is back (if its
// lease lapsed meanwhile, the job has been retried elsewhere, and whichever finishes first marks it done). A worker
// that is stopping gives its job back to the queue when it cannot finish within the grace time.

import { WaitingError, Worker, type Job } from "bullmq";
import { Redis } from "ioredis";
import type { KernelService } from "../kernels/kernel-service.js";
import type { JobConfig } from "./job-config.js";
import type { RendererRegistry } from "./renderers.js";
import { progressScript, redisKeys, transitionScript } from "./redis-keys.js";
import { encodeOutput, failureMessage, isAbort, renderJob, roundedSeconds, workerName, type JobSpec } from "./job-types.js";
import { throttledProgress } from "../progress/throttled-progress.js";
import type { QueuedJob } from "./redis-backend.js";
import { closeRedis, reconnectDelayMs, within } from "../redis/connection.js";
import { redisFrameStore } from "./redis-frame-store.js";
import { SEQUENCE_RENDERER } from "../sequence/sequence-job.js";

export interface WorkerOptions {
  config: JobConfig;
  registry: RendererRegistry;
  kernels: KernelService;
  maxTermAngles: number;
  /** One JSON line per event (job started, done, cancelled, failed). */
  log?: (event: Record<string, unknown>) => void;
}

export interface RunningWorker {
  /**
   * Takes no more jobs and waits for the jobs in hand; at giveBackAt (ms since the epoch) those still running are
   * stopped and put back in the queue, so that another worker takes them at once.
   */
  close(giveBackAt?: number): Promise<void>;
}

/** Why a render was stopped when its worker gives the job back. */
const GIVE_BACK = "the worker is shutting down";
/** A Redis command of a stopping worker waits at most this long (Redis may be away): the two of a give-back fit in 1 s. */
const STOPPING_COMMAND_MS = 500;
/** While Redis is away, one "queue error" line per this time, not one per reconnection attempt. */
const ERROR_LOG_EVERY_MS = 30_000;

/** Times BullMQ may find a job's worker dead before it gives the job up as failed. */
const MAX_STALLED = 3;

export async function startRedisWorker(options: WorkerOptions): Promise<RunningWorker> {
  const { config, registry, kernels, maxTermAngles } = options;
  const log = options.log ?? (() => undefined);
  const keys = redisKeys(config.redisPrefix);
  // No retry limit: a result finished during an outage waits here until Redis is back.
  const redis = new Redis(config.redisUrl, { maxRetriesPerRequest: null, retryStrategy: reconnectDelayMs });
  const cancels = new Redis(config.redisUrl, { maxRetriesPerRequest: null, retryStrategy: reconnectDelayMs });
  const inHand = new Map<string, AbortController>();
  let onDrained: (() => void)[] = [];
  /** Resolves once no job is in hand. */
  const drained = () => (inHand.size === 0 ? Promise.resolve() : new Promise<void>((resolve) => onDrained.push(resolve)));
  const ttl = String(config.jobResultTtlS);
  redis.on("error", () => undefined);
  cancels.on("error", () => undefined);

  const transition = async (id: string, state: string, fields: Record<string, string> = {}) =>
    (await redis.eval(transitionScript, 1, keys.record(id), state, keys.events(id), ttl, ...Object.entries(fields).flat())) as string | null;

  /** Stopped for shutdown: back to the queue (BullMQ and the record), each step bounded; a lapsed lease does the rest. */
  const giveBack = async (job: Job<QueuedJob>, token: string | undefined, started: number): Promise<never> => {
    const id = job.data.id;
    // Disconnected: nothing to try; the job's lease lapses and the stalled-job check of a worker puts it back.
    const moved = redis.status === "ready" && (await within(job.moveToWait(token).then(() => true), STOPPING_COMMAND_MS));
    if (moved) await within(transition(id, "queued", { stage: "queued again: its worker stopped" }), STOPPING_COMMAND_MS);
    log({ msg: moved ? "job given back" : "job left to its lease", id, ms: Math.round(performance.now() - started) });
    // BullMQ leaves a job alone that the processor has moved itself.
    throw new WaitingError();
  };

  const process = async (job: Job<QueuedJob>, token?: string, signal?: AbortSignal) => {
    const id = job.data.id;
    const state = await transition(id, "running", { startedAt: new Date().toISOString(), worker: workerName() });
    if (state !== "running") {
      log({ msg: "job skipped", id, state });
      return { state };
    }
    const spec = JSON.parse((await redis.hget(keys.record(id), "spec")) ?? "{}") as JobSpec;
    log({ msg: "job started", id, endpoint: spec.endpoint, attempt: job.attemptsStarted });
    const started = performance.now();
    const stopping = new AbortController();
    inHand.set(id, stopping);
    const abort = signal ? AbortSignal.any([signal, stopping.signal]) : stopping.signal;
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
    // A sequence keeps each frame as it finishes: a retry after this worker died renders only the missing ones.
    const frames =
      spec.endpoint === SEQUENCE_RENDERER ? redisFrameStore(redis, keys.frames(spec.hash), config.jobResultTtlS, (event) => log({ ...event, id })) : undefined;
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
          frames,
        });
        await redis.set(keys.result(spec.hash), encodeOutput(output), "EX", config.jobResultTtlS);
        await frames?.discard();
      }
      const final = await transition(id, "done", { finishedAt: new Date().toISOString(), fraction: "1", stage: "done", secondsLeft: "0" });
      // No record: Redis came back without its data (no persistence) while the job was being computed.
      log({ msg: final === null ? "job lost" : "job done", id, state: final, ms: Math.round(performance.now() - started) });
      return { state: final };
    } catch (error) {
      if (stopping.signal.aborted) return giveBack(job, token, started);
      if (isAbort(error, abort)) {
        log({ msg: "job cancelled", id, ms: Math.round(performance.now() - started) });
        return { state: "cancelled" };
      }
      await transition(id, "failed", { finishedAt: new Date().toISOString(), error: failureMessage(error) });
      log({ msg: "job failed", id, error: String(error) });
      return { state: "failed" };
    } finally {
      progress.stop();
      inHand.delete(id);
      if (inHand.size === 0) {
        for (const resolve of onDrained) resolve();
        onDrained = [];
      }
    }
  };

  const worker = new Worker<QueuedJob>(keys.queue, process, {
    connection: { url: config.redisUrl, maxRetriesPerRequest: null, retryStrategy: reconnectDelayMs },
    prefix: keys.bullPrefix,
    concurrency: config.jobConcurrency,
    lockDuration: config.jobLockMs,
    stalledInterval: config.jobStalledIntervalMs,
    maxStalledCount: MAX_STALLED,
  });
  let lastErrorLog = -Infinity;
  worker.on("error", (error) => {
    if (performance.now() - lastErrorLog < ERROR_LOG_EVERY_MS) return;
    lastErrorLog = performance.now();
    log({ msg: "queue error", error: String(error) });
  });
  // BullMQ gives a job up when its workers kept dying: the record must say so too.
  worker.on("failed", (job, error) => {
    if (job) void transition(job.data.id, "failed", { finishedAt: new Date().toISOString(), error: `the job was given up: ${error.message}` });
  });

  await cancels.subscribe(keys.cancel);
  cancels.on("message", (_channel: string, id: string) => {
    if (worker.cancelJob(id, "cancelled by the client")) log({ msg: "job cancel requested", id });
  });

  return {
    close: async (giveBackAt = Infinity) => {
      const timer = Number.isFinite(giveBackAt)
        ? setTimeout(() => {
            for (const controller of inHand.values()) controller.abort(new Error(GIVE_BACK));
          }, Math.max(0, giveBackAt - Date.now()))
        : undefined;
      try {
        const closing = worker.close().then(() => true);
        if (!Number.isFinite(giveBackAt)) await closing;
        else {
          // Jobs in hand end by the give-back (and its two bounded commands); BullMQ's close then waits for Redis to
          // answer, so it gets a moment only while Redis is connected, and the sockets are dropped after.
          await within(drained(), giveBackAt + 2 * STOPPING_COMMAND_MS - Date.now());
          // Still in hand (a finished render waiting for Redis to store its result): retried once its lease lapses.
          for (const id of inHand.keys()) log({ msg: "job left to its lease", id });
          const closed = redis.status === "ready" && (await within(closing, 2 * STOPPING_COMMAND_MS));
          if (!closed) await within(worker.disconnect(), STOPPING_COMMAND_MS);
        }
      } finally {
        clearTimeout(timer);
      }
      cancels.disconnect();
      await closeRedis(redis);
    },
  };
}
