// Jobs in this process: an in-memory queue and job table, results in memory and in CACHE_DIR/jobs (checksummed,
// atomic files), so that `npm start` alone serves jobs.

import { EventEmitter } from "node:events";
import { randomUUID } from "node:crypto";
import type { KernelService } from "../kernels/kernel-service.js";
import type { DiskStore } from "../kernels/disk-store.js";
import type { LRUCache } from "lru-cache";
import { byteBoundedCache } from "../kernels/byte-bounded-cache.js";
import type { RenderOutput } from "../render/render-output.js";
import type { RendererRegistry } from "./renderers.js";
import { throttledProgress } from "../progress/throttled-progress.js";
import {
  decodeOutput,
  encodeOutput,
  failureMessage,
  isAbort,
  renderJob,
  risingProgress,
  roundedSeconds,
  terminalStates,
  workerName,
  type JobBackend,
  type JobRecord,
  type JobSpec,
  type JobState,
} from "./job-types.js";

/** Finished job records kept for GET /v1/jobs/:id; the oldest finished ones go first. */
const MAX_RECORDS = 10_000;

export interface EmbeddedOptions {
  registry: RendererRegistry;
  kernels: KernelService;
  maxTermAngles: number;
  concurrency: number;
  /** Result files; undefined keeps results in memory only. */
  disk?: DiskStore;
  memoryBudgetBytes: number;
  onError?: (error: unknown, record: JobRecord) => void;
}

interface Payload {
  bytes: Buffer;
  byteLength: number;
}

export class EmbeddedJobBackend implements JobBackend {
  readonly mode = "in-process" as const;
  private readonly records = new Map<string, JobRecord>();
  private readonly specs = new Map<string, JobSpec>();
  private readonly controllers = new Map<string, AbortController>();
  private readonly running = new Set<Promise<void>>();
  private readonly waiting: string[] = [];
  private readonly events = new EventEmitter();
  private readonly memory: LRUCache<string, Payload>;
  private closed = false;

  constructor(private readonly options: EmbeddedOptions) {
    this.memory = byteBoundedCache(options.memoryBudgetBytes);
    this.events.setMaxListeners(0);
  }

  async submit(spec: JobSpec): Promise<JobRecord> {
    const now = new Date().toISOString();
    const record: JobRecord = {
      id: randomUUID(),
      endpoint: spec.endpoint,
      state: "queued",
      progress: { fraction: 0, stage: "queued" },
      hash: spec.hash,
      reused: false,
      createdAt: now,
      attempts: 0,
    };
    if (await this.result(spec.hash)) {
      Object.assign(record, { state: "done", reused: true, finishedAt: now, progress: { fraction: 1, stage: "done" } });
    } else {
      this.specs.set(record.id, spec);
      this.waiting.push(record.id);
    }
    this.records.set(record.id, record);
    this.prune();
    this.pump();
    return { ...record };
  }

  async get(id: string): Promise<JobRecord | undefined> {
    const record = this.records.get(id);
    return record && { ...record, progress: { ...record.progress } };
  }

  async result(hash: string): Promise<RenderOutput | undefined> {
    const held = this.memory.get(hash);
    if (held) return decodeOutput(held.bytes);
    const bytes = await this.options.disk?.read(hash);
    if (!bytes) return undefined;
    this.memory.set(hash, { bytes, byteLength: bytes.length });
    return decodeOutput(bytes);
  }

  async cancel(id: string): Promise<JobRecord | undefined> {
    const record = this.records.get(id);
    if (!record) return undefined;
    if (!terminalStates.includes(record.state)) {
      record.state = "cancelled";
      record.finishedAt = new Date().toISOString();
      const at = this.waiting.indexOf(id);
      if (at >= 0) this.waiting.splice(at, 1);
      this.controllers.get(id)?.abort(new Error("the job was cancelled"));
      this.changed(id);
    }
    return this.get(id);
  }

  watch(id: string, onChange: () => void): () => void {
    this.events.on(id, onChange);
    return () => this.events.off(id, onChange);
  }

  async ready() {
    return { ok: !this.closed, detail: `jobs run in this process (${this.running.size} running, ${this.waiting.length} waiting)` };
  }

  async close(): Promise<void> {
    this.closed = true;
    this.waiting.length = 0;
    for (const controller of this.controllers.values()) controller.abort(new Error("the service is shutting down"));
    await Promise.allSettled([...this.running]);
  }

  private changed(id: string): void {
    this.events.emit(id);
  }

  private pump(): void {
    while (!this.closed && this.running.size < this.options.concurrency && this.waiting.length) {
      const id = this.waiting.shift()!;
      const run: Promise<void> = this.run(id).finally(() => {
        this.running.delete(run);
        this.pump();
      });
      this.running.add(run);
    }
  }

  private async run(id: string): Promise<void> {
    const record = this.records.get(id)!;
    // cancel() changes the state while the render runs; read it afresh each time.
    const stillRunning = () => (record.state as JobState) === "running";
    const spec = this.specs.get(id)!;
    this.specs.delete(id);
    if (record.state !== "queued") return;
    const controller = new AbortController();
    this.controllers.set(id, controller);
    Object.assign(record, { state: "running", startedAt: new Date().toISOString(), worker: workerName(), attempts: record.attempts + 1 });
    record.progress = { fraction: 0, stage: "starting" };
    this.changed(id);
    const progress = throttledProgress(({ fraction, stage, secondsLeft }) => {
      if (!stillRunning() || !risingProgress(record.progress, fraction)) return;
      record.progress = { fraction, stage, secondsLeft: roundedSeconds(secondsLeft) };
      this.changed(id);
    });
    try {
      // An identical job may have finished while this one waited.
      const earlier = await this.result(spec.hash);
      if (!earlier) {
        const output = await renderJob(this.options.registry, spec, {
          kernels: this.options.kernels,
          maxTermAngles: this.options.maxTermAngles,
          signal: controller.signal,
          onProgress: progress.listener,
          saveEachTask: true,
        });
        await this.store(spec.hash, output);
      } else record.reused = true;
      if (stillRunning()) {
        Object.assign(record, { state: "done", finishedAt: new Date().toISOString(), progress: { fraction: 1, stage: "done", secondsLeft: 0 } });
      }
    } catch (error) {
      if (stillRunning()) {
        const failed = this.closed || !isAbort(error, controller.signal);
        Object.assign(record, { state: failed ? "failed" : "cancelled", finishedAt: new Date().toISOString() });
        if (this.closed) record.error = "the service shut down while the job ran; submit it again";
        else if (failed) {
          record.error = failureMessage(error);
          this.options.onError?.(error, record);
        }
      }
    } finally {
      progress.stop();
      this.controllers.delete(id);
      this.changed(id);
    }
  }

  private async store(hash: string, output: RenderOutput): Promise<void> {
    const bytes = encodeOutput(output);
    this.memory.set(hash, { bytes, byteLength: bytes.length });
    try {
      await this.options.disk?.write(hash, bytes);
    } catch {
      // The memory copy serves this process; the file only outlives a restart.
    }
  }

  private prune(): void {
    if (this.records.size <= MAX_RECORDS) return;
    for (const [id, record] of this.records) {
      if (this.records.size <= MAX_RECORDS) break;
      if (terminalStates.includes(record.state)) this.records.delete(id);
    }
  }
}
