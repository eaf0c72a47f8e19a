// Scale-out jobs: a BullMQ queue in Redis; job records (hashes) and results (binary values with a TTL) in Redis,
// so that any API process answers for any job. Workers (pipeline/jobs/worker-main.ts) take jobs off the queue.

import { Queue } from "bullmq";
import { Redis } from "ioredis";
import type { RenderOutput } from "../render/render-output.js";
import type { JobConfig } from "./job-config.js";
import { redisKeys, transitionScript } from "./redis-keys.js";
import { JobError } from "./job-errors.js";
import { ClientError } from "../requests/client-error.js";
import { idTimeMs, timeOrderedId } from "./job-id.js";
import { closeRedis, reconnectDelayMs, within } from "../redis/connection.js";
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

/** Longest a job request waits for Redis before it is answered 503 (our choice: an answer within a second). */
export const JOB_STORE_DEADLINE_MS = 800;
/** What the 503 tells clients to wait: about the time Redis needs to restart and load its append-only file. */
const RETRY_AFTER_S = 5;

function storeAway(): JobError {
  return new JobError("not-ready", "the job store (Redis) does not answer; retry shortly", { retryAfterS: RETRY_AFTER_S });
}

/**
 * A Redis outage is a 503 with Retry-After within JOB_STORE_DEADLINE_MS (readiness takes the process out
 * meanwhile), not a 500 and not a hang: at once while the connection is down, else when Redis is too slow.
 */
async function guarded<T>(redis: Redis, work: () => Promise<T>): Promise<T> {
  if (redis.status !== "ready") throw storeAway();
  let timer: ReturnType<typeof setTimeout> | undefined;
  const deadline = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(storeAway()), JOB_STORE_DEADLINE_MS);
  });
  try {
    return await Promise.race([work(), deadline]);
  } catch (error) {
    if (error instanceof ClientError) throw error;
    throw storeAway();
  } finally {
    clearTimeout(timer);
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
    this.redis = new Redis(config.redisUrl, { maxRetriesPerRequest: 1, enableOfflineQueue: true, lazyConnect: false, retryStrategy: reconnectDelayMs });
    this.subscriber = new Redis(config.redisUrl, { maxRetriesPerRequest: null, retryStrategy: reconnectDelayMs });
    // The time this Redis's data set began, as far as jobs can tell: set once, kept while Redis keeps its data.
    this.redis.on("ready", () => void this.redis.set(this.keys.dataSince, new Date().toISOString(), "NX").catch(() => undefined));
    this.redis.on("error", () => undefined);
    this.subscriber.on("error", () => undefined);
    this.subscriber.on("pmessage", (_pattern: string, channel: string) => {
      const id = channel.slice(channel.lastIndexOf(":") + 1);
      for (const listener of this.watchers.get(id) ?? []) listener();
    });
    this.queue = new Queue<QueuedJob>(this.keys.queue, { connection: { url: config.redisUrl, retryStrategy: reconnectDelayMs }, prefix: this.keys.bullPrefix });
    this.queue.on("error", () => undefined);
  }

  submit(spec: JobSpec): Promise<JobRecord> {
    return guarded(this.redis, () => this.submitNow(spec));
  }

  private async submitNow(spec: JobSpec): Promise<JobRecord> {
    const id = timeOrderedId();
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
    await this.redis
      .multi()
      .set(this.keys.dataSince, now, "NX")
      .hset(this.keys.record(id), fields)
      .expire(this.keys.record(id), this.config.jobResultTtlS)
      .exec();
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
    return guarded(this.redis, () => this.getNow(id));
  }

  private async getNow(id: string): Promise<JobRecord | undefined> {
    const record = parseRecord(await this.redis.hgetall(this.keys.record(id)));
    if (!record && (await this.lost(id))) {
      throw new ClientError(
        "not-found",
        `job '${id}' was lost by the job queue: Redis restarted without its data after the job was queued (see deploy/README.md, persistence); submit it again`,
        { field: "id", lost: true },
      );
    }
    return record;
  }

  /** A job of ours whose record is missing though it has not expired, and that is older than Redis's data set. */
  private async lost(id: string): Promise<boolean> {
    const createdMs = idTimeMs(id);
    if (createdMs === undefined || createdMs < Date.now() - this.config.jobResultTtlS * 1000) return false;
    const since = await this.redis.get(this.keys.dataSince);
    return since !== null && createdMs < Date.parse(since);
  }

  result(hash: string): Promise<RenderOutput | undefined> {
    return guarded(this.redis, () => this.resultNow(hash));
  }

  private async resultNow(hash: string): Promise<RenderOutput | undefined> {
    const bytes = await this.redis.getBuffer(this.keys.result(hash));
    return bytes ? decodeOutput(bytes) : undefined;
  }

  cancel(id: string): Promise<JobRecord | undefined> {
    return guarded(this.redis, () => this.cancelNow(id));
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

  /** Bounded whether or not Redis answers: each connection gets a second to close cleanly, then is dropped. */
  async close(): Promise<void> {
    const closed = this.redis.status === "ready" && (await within(this.queue.close().then(() => true), 1000));
    if (!closed) await within(this.queue.disconnect(), 100);
    this.subscriber.disconnect();
    await closeRedis(this.redis);
  }
}
