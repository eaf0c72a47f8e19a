// Scale-out jobs: a BullMQ queue in Redis; job records (hashes) and results (binary values with a TTL) in Redis,
// so that any API process answers for any job. Workers (pipeline/jobs/worker-main.ts) take jobs off the queue.

import { randomUUID } from "node:crypto";
import { Queue } from "bullmq";
import { Redis } from "ioredis";
import type { RenderOutput } from "../render/render-output.js";
import type { JobConfig } from "./job-config.js";
import { redisKeys, transitionScript } from "./redis-keys.js";
import { JobError } from "./job-errors.js";
import { decodeOutput, type JobBackend, type JobRecord, type JobSpec, type JobState } from "./job-types.js";

export interface QueuedJob {
  id: string;
}

export function parseRecord(fields: Record<string, string>): JobRecord | undefined {
  if (!fields.id) return undefined;
  return {
    id: fields.id,
    endpoint: fields.endpoint,
    state: fields.state as JobState,
    progress: {
      fraction: Number(fields.fraction ?? 0),
      stage: fields.stage ?? "",
      secondsLeft: fields.secondsLeft ? Number(fields.secondsLeft) : fields.state === "done" ? 0 : null,
    },
    hash: fields.hash,
    reused: fields.reused === "1",
    createdAt: fields.createdAt,
    ...(fields.startedAt ? { startedAt: fields.startedAt } : {}),
    ...(fields.finishedAt ? { finishedAt: fields.finishedAt } : {}),
    attempts: Number(fields.attempts ?? 0),
    ...(fields.worker ? { worker: fields.worker } : {}),
    ...(fields.error ? { error: fields.error } : {}),
  };
}

/** A Redis outage is a 503 with Retry-After (readiness takes the process out meanwhile), not a 500. */
async function guarded<T>(work: Promise<T>): Promise<T> {
  try {
    return await work;
  } catch (error) {
    if (error instanceof JobError) throw error;
    throw new JobError("not-ready", "the job store (Redis) does not answer; retry shortly", { retryAfterS: 5 });
  }
}

export class RedisJobBackend implements JobBackend {
  readonly mode = "redis" as const;
  private readonly keys: ReturnType<typeof redisKeys>;
  private readonly redis: Redis;
  private readonly subscriber: Redis;
  private readonly queue: Queue<QueuedJob>;
  private readonly watchers = new Map<string, Set<() => void>>();
  private subscribed?: Promise<unknown>;

  constructor(private readonly config: JobConfig) {
    this.keys = redisKeys(config.redisPrefix);
    // Fail fast while Redis is away: a request gets an error, not a hang (readiness takes the pod out meanwhile).
    this.redis = new Redis(config.redisUrl, { maxRetriesPerRequest: 1, enableOfflineQueue: true, lazyConnect: false });
    this.subscriber = new Redis(config.redisUrl, { maxRetriesPerRequest: null });
    this.redis.on("error", () => undefined);
    this.subscriber.on("error", () => undefined);
    this.subscriber.on("pmessage", (_pattern: string, channel: string) => {
      const id = channel.slice(channel.lastIndexOf(":") + 1);
      for (const listener of this.watchers.get(id) ?? []) listener();
    });
    this.queue = new Queue<QueuedJob>(this.keys.queue, { connection: { url: config.redisUrl }, prefix: this.keys.bullPrefix });
    this.queue.on("error", () => undefined);
  }

  submit(spec: JobSpec): Promise<JobRecord> {
    return guarded(this.submitNow(spec));
  }

  private async submitNow(spec: JobSpec): Promise<JobRecord> {
    const id = randomUUID();
    const now = new Date().toISOString();
    const reused = (await this.redis.exists(this.keys.result(spec.hash))) === 1;
    const fields: Record<string, string> = {
      id,
      endpoint: spec.endpoint,
      hash: spec.hash,
      state: reused ? "done" : "queued",
      fraction: reused ? "1" : "0",
      stage: reused ? "done" : "queued",
      reused: reused ? "1" : "0",
      createdAt: now,
      attempts: "0",
      spec: JSON.stringify(spec),
      ...(reused ? { finishedAt: now } : {}),
    };
    await this.redis.multi().hset(this.keys.record(id), fields).expire(this.keys.record(id), this.config.jobResultTtlS).exec();
    if (!reused) {
      await this.queue.add("render", { id }, {
        jobId: id,
        // The job record is what clients read; BullMQ's own copy is only needed while the job is in the queue.
        removeOnComplete: true,
        removeOnFail: { age: this.config.jobResultTtlS },
      });
    }
    return parseRecord(fields)!;
  }

  get(id: string): Promise<JobRecord | undefined> {
    return guarded(this.getNow(id));
  }

  private async getNow(id: string): Promise<JobRecord | undefined> {
    return parseRecord(await this.redis.hgetall(this.keys.record(id)));
  }

  result(hash: string): Promise<RenderOutput | undefined> {
    return guarded(this.resultNow(hash));
  }

  private async resultNow(hash: string): Promise<RenderOutput | undefined> {
    const bytes = await this.redis.getBuffer(this.keys.result(hash));
    return bytes ? decodeOutput(bytes) : undefined;
  }

  cancel(id: string): Promise<JobRecord | undefined> {
    return guarded(this.cancelNow(id));
  }

  private async cancelNow(id: string): Promise<JobRecord | undefined> {
    const key = this.keys.record(id);
    const state = (await this.redis.eval(
      transitionScript, 1, key, "cancelled", this.keys.events(id), String(this.config.jobResultTtlS), "finishedAt", new Date().toISOString(),
    )) as string | null;
    if (state === null) return undefined;
    if (state === "cancelled") {
      // Whichever worker holds the job aborts its render; a job still in the queue is skipped when it comes up.
      await this.redis.publish(this.keys.cancel, id);
      await this.queue.remove(id).catch(() => 0);
    }
    return this.get(id);
  }

  watch(id: string, onChange: () => void): () => void {
    this.subscribed ??= this.subscriber.psubscribe(this.keys.eventsPattern);
    let set = this.watchers.get(id);
    if (!set) this.watchers.set(id, (set = new Set()));
    set.add(onChange);
    return () => {
      set.delete(onChange);
      if (!set.size) this.watchers.delete(id);
    };
  }

  async ready() {
    try {
      const answer = await Promise.race([
        this.redis.ping(),
        new Promise<string>((_, reject) => setTimeout(() => reject(new Error("no answer within 1 s")), 1000).unref()),
      ]);
      return { ok: answer === "PONG", detail: "redis answers" };
    } catch (error) {
      return { ok: false, detail: `redis is not reachable: ${(error as Error).message}` };
    }
  }

  async close(): Promise<void> {
    await this.queue.close().catch(() => undefined);
    this.subscriber.disconnect();
    await this.redis.quit().catch(() => undefined);
  }
}
