// Per-drop kernels β(ψ) on the angle lattice, computed once and reused: memory (LRU by bytes), then disk
// (content-addressed packs), then computation in worker threads. Concurrent requests for the same kernel row
// share one computation. A pack holds the rows of many drop radii for one wavelength, engine, step and block.

import type { DropEngine } from "../../lib/bow/volume-scattering.js";
import { setMaxListeners } from "node:events";
import { ByteLru } from "./byte-lru.js";
import type { DiskStore } from "./disk-store.js";
import type { KernelTask, KernelTaskResult, Medium } from "./kernel-types.js";

/** Bump when the physics of a kernel row changes, so that stale cache entries are never read. */
export const KERNEL_VERSION = 4;

export type KernelCompute = (task: KernelTask, signal?: AbortSignal) => Promise<KernelTaskResult>;

export interface KernelRequest {
  h: number;
  media: Medium[];
  radiiUm: Float64Array;
  engines: DropEngine[];
  blocks: number[];
}

export interface KernelStats {
  memoryHits: number;
  diskHits: number;
  computed: number;
  mieTermAngles: number;
}

export interface KernelRows {
  /** β⊥ then β∥ over one block for wavelength l and radius i. */
  get(l: number, i: number, block: number): Float64Array;
  stats: KernelStats;
}

class Pack {
  readonly rows = new Map<number, Float64Array>();
  byteLength = 0;
  add(radiusUm: number, row: Float64Array): void {
    const old = this.rows.get(radiusUm);
    if (old) this.byteLength -= old.byteLength;
    this.rows.set(radiusUm, row);
    this.byteLength += row.byteLength + 64;
  }
}

function packKey(m: Medium, engine: DropEngine, h: number, block: number): string {
  return `v${KERNEL_VERSION}|${m.wavelengthNm}|${m.mRe}|${m.mIm}|${m.nAir}|${engine}|${h}|${block}`;
}

export class KernelService {
  readonly memory: ByteLru<Pack>;
  private readonly inflight = new Map<string, { task: Promise<KernelTaskResult>; item: number; block: number }>();
  private readonly packLoads = new Map<string, Promise<void>>();
  private readonly pendingWrites = new Set<Promise<void>>();

  constructor(private readonly options: { memoryBudgetBytes: number; disk?: Pick<DiskStore, "read" | "write">; compute: KernelCompute }) {
    this.memory = new ByteLru(options.memoryBudgetBytes);
  }

  private remember(pack: string, radiusUm: number, row: Float64Array): void {
    const entry = this.memory.take(pack) ?? new Pack();
    entry.add(radiusUm, row);
    this.memory.set(pack, entry);
  }

  async rows(request: KernelRequest, signal?: AbortSignal): Promise<KernelRows> {
    const { h, media, radiiUm, engines, blocks } = request;
    const stats: KernelStats = { memoryHits: 0, diskHits: 0, computed: 0, mieTermAngles: 0 };
    const engineSet = [...new Set(engines)];
    // found[l][blockIndex]: radius → row, whatever engine served it (each radius has one engine).
    const found = media.map(() => blocks.map(() => new Map<number, Float64Array>()));
    const keys = media.map((m) => blocks.map((b) => new Map(engineSet.map((e) => [e, packKey(m, e, h, b)]))));

    const lookMemory = () => {
      const missing: [number, number, number][] = [];
      for (let l = 0; l < media.length; l++) {
        for (let bi = 0; bi < blocks.length; bi++) {
          const have = found[l][bi];
          const packs = new Map(engineSet.map((e) => [e, this.memory.get(keys[l][bi].get(e)!)]));
          for (let i = 0; i < radiiUm.length; i++) {
            if (have.has(radiiUm[i])) continue;
            const row = packs.get(engines[i])?.rows.get(radiiUm[i]);
            if (row) have.set(radiiUm[i], row);
            else missing.push([l, i, bi]);
          }
        }
      }
      return missing;
    };

    let missing = lookMemory();
    stats.memoryHits = media.length * radiiUm.length * blocks.length - missing.length;
    if (missing.length && this.options.disk) {
      const packs = new Set(missing.map(([l, i, bi]) => keys[l][bi].get(engines[i])!));
      await Promise.all([...packs].map((p) => this.loadPack(p)));
      const before = missing.length;
      missing = lookMemory();
      stats.diskHits = before - missing.length;
    }

    // Rows another request is computing already are awaited, not computed twice. In-flight rows point at the
    // task that computes them (one promise per task, not per row: a cold profile has ~50,000 rows).
    const waits: Promise<void>[] = [];
    const toCompute = new Map<number, Map<number, number[]>>();
    for (const [l, i, bi] of missing) {
      const pending = this.inflight.get(`${keys[l][bi].get(engines[i])}|${radiiUm[i]}`);
      if (pending) {
        waits.push(pending.task.then((result) => void found[l][bi].set(radiiUm[i], result.rows[pending.item][pending.block])));
        continue;
      }
      let byRadius = toCompute.get(l);
      if (!byRadius) toCompute.set(l, (byRadius = new Map()));
      let list = byRadius.get(i);
      if (!list) byRadius.set(i, (list = []));
      list.push(bi);
    }

    // One failed task stops this request's other tasks; the caller's signal (client gone) stops them all.
    const stop = new AbortController();
    setMaxListeners(0, stop.signal);
    const onAbort = () => stop.abort(signal?.reason);
    signal?.addEventListener("abort", onAbort, { once: true });
    // Settle borrowed rows from the start, so that their failure is never an unhandled rejection.
    const borrowedSettled = Promise.allSettled(waits);
    const tasks: Promise<void>[] = [];
    for (const [l, byRadius] of toCompute) {
      const indices = [...byRadius.keys()];
      const items = indices.map((i) => ({ radiusUm: radiiUm[i], engine: engines[i], blocks: byRadius.get(i)!.map((bi) => blocks[bi]) }));
      const computing = this.options.compute({ medium: media[l], h, items }, stop.signal);
      computing.catch(() => undefined);
      const rowKeys: string[] = [];
      indices.forEach((i, item) => {
        byRadius.get(i)!.forEach((bi, block) => {
          const rowKey = `${keys[l][bi].get(engines[i])}|${radiiUm[i]}`;
          rowKeys.push(rowKey);
          this.inflight.set(rowKey, { task: computing, item, block });
        });
      });
      const task = computing
        .then((result) => {
          stats.mieTermAngles += result.mieTermAngles;
          const written = new Map<string, Map<number, Float64Array>>();
          indices.forEach((i, itemIndex) => {
            byRadius.get(i)!.forEach((bi, k) => {
              const pack = keys[l][bi].get(engines[i])!;
              const row = result.rows[itemIndex][k];
              this.remember(pack, radiiUm[i], row);
              found[l][bi].set(radiiUm[i], row);
              stats.computed++;
              if (!written.has(pack)) written.set(pack, new Map());
              written.get(pack)!.set(radiiUm[i], row);
            });
          });
          if (this.options.disk) {
            for (const [pack, rows] of written) {
              const write: Promise<void> = this.savePack(pack, rows).finally(() => this.pendingWrites.delete(write));
              this.pendingWrites.add(write);
            }
          }
        })
        .catch((error: unknown) => {
          stop.abort(error);
          throw error;
        })
        .finally(() => {
          for (const rowKey of rowKeys) if (this.inflight.get(rowKey)?.task === computing) this.inflight.delete(rowKey);
        });
      tasks.push(task);
    }
    try {
      await Promise.all(tasks);
    } catch (error) {
      await Promise.allSettled(tasks);
      throw error;
    } finally {
      signal?.removeEventListener("abort", onAbort);
    }
    // Rows borrowed from another request fail with it if that client went away: compute them for this one.
    const borrowed = await borrowedSettled;
    if (borrowed.some((r) => r.status === "rejected")) {
      signal?.throwIfAborted();
      return this.rows(request, signal);
    }
    const blockIndex = new Map(blocks.map((b, bi) => [b, bi]));
    return {
      get: (l, i, b) => {
        const row = found[l][blockIndex.get(b)!].get(radiiUm[i]);
        if (!row) throw new Error(`kernel row missing for wavelength ${l}, radius ${i}, block ${b}`);
        return row;
      },
      stats,
    };
  }

  /** Resolves when every disk write started so far has finished (writes never hold up a response). */
  async flush(): Promise<void> {
    while (this.pendingWrites.size) await Promise.all([...this.pendingWrites]);
  }

  private loadPack(pack: string): Promise<void> {
    let load = this.packLoads.get(pack);
    if (!load) {
      load = this.readPack(pack).finally(() => this.packLoads.delete(pack));
      this.packLoads.set(pack, load);
    }
    return load;
  }

  private async readPack(pack: string): Promise<void> {
    const payload = await this.options.disk!.read(pack);
    if (!payload) return;
    for (const [radius, row] of decodePack(payload)) this.remember(pack, radius, row);
  }

  private async savePack(pack: string, rows: Map<number, Float64Array>): Promise<void> {
    try {
      const existing = await this.options.disk!.read(pack);
      const merged = existing ? decodePack(existing) : new Map<number, Float64Array>();
      for (const [radius, row] of rows) merged.set(radius, row);
      await this.options.disk!.write(pack, encodePack(merged));
    } catch {
      // The disk cache is an optimisation: a failed write only costs a recomputation later.
    }
  }
}

/** Pack payload: u32 header length, JSON {radii, rowLength}, then the rows as little-endian float64. */
function encodePack(rows: Map<number, Float64Array>): Buffer {
  const rowLength = rows.values().next().value!.length;
  const radii = [...rows.keys()].sort((a, b) => a - b);
  const header = Buffer.from(JSON.stringify({ radii, rowLength }));
  const data = Buffer.alloc(radii.length * rowLength * 8);
  radii.forEach((radius, r) => Buffer.from(rows.get(radius)!.buffer, rows.get(radius)!.byteOffset, rowLength * 8).copy(data, r * rowLength * 8));
  const length = Buffer.alloc(4);
  length.writeUInt32LE(header.length, 0);
  return Buffer.concat([length, header, data]);
}

function decodePack(payload: Buffer): Map<number, Float64Array> {
  const length = payload.readUInt32LE(0);
  const { radii, rowLength } = JSON.parse(payload.subarray(4, 4 + length).toString("utf8")) as { radii: number[]; rowLength: number };
  const start = 4 + length;
  const out = new Map<number, Float64Array>();
  radii.forEach((radius, r) => {
    const row = new Float64Array(rowLength);
    Buffer.from(row.buffer).set(payload.subarray(start + r * rowLength * 8, start + (r + 1) * rowLength * 8));
    out.set(radius, row);
  });
  return out;
}
