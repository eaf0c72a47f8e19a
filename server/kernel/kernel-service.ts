// Per-drop kernels β(ψ) on the angle lattice, computed once and reused: memory (LRU by bytes), then disk
// (content-addressed packs), then computation in worker threads. Concurrent requests for the same kernel row
// share one computation.

import type { DropEngine } from "../../lib/bow/volume-scattering.js";
import { ByteLru } from "./byte-lru.js";
import type { DiskStore } from "./disk-store.js";
import type { KernelTask, KernelTaskResult, Medium } from "./kernel-types.js";

/** Bump when the physics of a kernel row changes, so that stale cache entries are never read. */
export const KERNEL_VERSION = 1;

export type KernelCompute = (task: KernelTask, signal?: AbortSignal) => Promise<KernelTaskResult>;

export interface KernelRequest {
  h: number;
  media: Medium[];
  radiiUm: Float64Array;
  engines: DropEngine[];
  blocks: number[];
}

export interface KernelRows {
  /** β⊥ then β∥ over one block for wavelength l and radius i. */
  get(l: number, i: number, block: number): Float64Array;
  stats: { memoryHits: number; diskHits: number; computed: number; mieTermAngles: number };
}

function mediumKey(m: Medium): string {
  return `${m.wavelengthNm}|${m.mRe}|${m.mIm}|${m.nAir}`;
}

function packKey(m: Medium, engine: DropEngine, h: number, block: number): string {
  return `v${KERNEL_VERSION}|${mediumKey(m)}|${engine}|${h}|${block}`;
}

function rowKey(pack: string, radiusUm: number): string {
  return `${pack}|${radiusUm}`;
}

export class KernelService {
  readonly memory: ByteLru<Float64Array>;
  private readonly inflight = new Map<string, Promise<Float64Array>>();
  private readonly packLoads = new Map<string, Promise<void>>();
  private readonly pendingWrites = new Set<Promise<void>>();

  constructor(
    private readonly options: { memoryBudgetBytes: number; disk?: DiskStore; compute: KernelCompute },
  ) {
    this.memory = new ByteLru(options.memoryBudgetBytes);
  }

  async rows(request: KernelRequest, signal?: AbortSignal): Promise<KernelRows> {
    const { h, media, radiiUm, engines, blocks } = request;
    const stats = { memoryHits: 0, diskHits: 0, computed: 0, mieTermAngles: 0 };
    const found = new Map<string, Float64Array>();
    const keyOf = (l: number, i: number, b: number) => rowKey(packKey(media[l], engines[i], h, b), radiiUm[i]);

    const lookMemory = () => {
      const missing: [number, number, number][] = [];
      for (let l = 0; l < media.length; l++) {
        for (let i = 0; i < radiiUm.length; i++) {
          for (const b of blocks) {
            const key = keyOf(l, i, b);
            if (found.has(key)) continue;
            const row = this.memory.get(key);
            if (row) found.set(key, row);
            else missing.push([l, i, b]);
          }
        }
      }
      return missing;
    };

    let missing = lookMemory();
    stats.memoryHits = media.length * radiiUm.length * blocks.length - missing.length;
    if (missing.length && this.options.disk) {
      const packs = new Set(missing.map(([l, i, b]) => packKey(media[l], engines[i], h, b)));
      await Promise.all([...packs].map((p) => this.loadPack(p)));
      const before = missing.length;
      missing = lookMemory();
      stats.diskHits = before - missing.length;
    }

    // Rows another request is computing already are awaited, not computed twice.
    const waits: Promise<void>[] = [];
    const toCompute = new Map<number, Map<number, number[]>>();
    for (const [l, i, b] of missing) {
      const key = keyOf(l, i, b);
      const pending = this.inflight.get(key);
      if (pending) {
        waits.push(pending.then((row) => void found.set(key, row)));
        continue;
      }
      let byRadius = toCompute.get(l);
      if (!byRadius) toCompute.set(l, (byRadius = new Map()));
      let list = byRadius.get(i);
      if (!list) byRadius.set(i, (list = []));
      list.push(b);
    }

    const tasks: Promise<void>[] = [];
    for (const [l, byRadius] of toCompute) {
      const items = [...byRadius].map(([i, bs]) => ({ radiusUm: radiiUm[i], engine: engines[i], blocks: bs }));
      const indices = [...byRadius.keys()];
      const resolvers = new Map<string, { resolve: (r: Float64Array) => void; reject: (e: unknown) => void }>();
      for (const [i, bs] of byRadius) {
        for (const b of bs) {
          const key = keyOf(l, i, b);
          const promise = new Promise<Float64Array>((resolve, reject) => resolvers.set(key, { resolve, reject }));
          promise.catch(() => undefined);
          this.inflight.set(key, promise);
        }
      }
      const task = this.options
        .compute({ medium: media[l], h, items }, signal)
        .then((result) => {
          stats.mieTermAngles += result.mieTermAngles;
          const written = new Map<string, Map<number, Float64Array>>();
          indices.forEach((i, itemIndex) => {
            items[itemIndex].blocks.forEach((b, blockIndex) => {
              const key = keyOf(l, i, b);
              const row = result.rows[itemIndex][blockIndex];
              this.memory.set(key, row);
              found.set(key, row);
              stats.computed++;
              resolvers.get(key)!.resolve(row);
              this.inflight.delete(key);
              const pack = packKey(media[l], engines[i], h, b);
              if (!written.has(pack)) written.set(pack, new Map());
              written.get(pack)!.set(radiiUm[i], row);
            });
          });
          if (this.options.disk) {
            for (const [pack, rows] of written) {
              const write = this.savePack(pack, rows).finally(() => this.pendingWrites.delete(write));
              this.pendingWrites.add(write);
            }
          }
        })
        .catch((error: unknown) => {
          for (const [key, r] of resolvers) {
            if (this.inflight.get(key)) this.inflight.delete(key);
            r.reject(error);
          }
          throw error;
        });
      tasks.push(task);
    }
    await Promise.all([...tasks, ...waits]);
    return {
      get: (l, i, b) => {
        const row = found.get(keyOf(l, i, b));
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
    const { radii, rowLength } = decodePackHeader(payload);
    const dataStart = payload.readUInt32LE(0) + 4;
    for (let r = 0; r < radii.length; r++) {
      const bytes = payload.subarray(dataStart + r * rowLength * 8, dataStart + (r + 1) * rowLength * 8);
      const row = new Float64Array(rowLength);
      Buffer.from(row.buffer).set(bytes);
      this.memory.set(rowKey(pack, radii[r]), row);
    }
  }

  private async savePack(pack: string, rows: Map<number, Float64Array>): Promise<void> {
    try {
      const merged = new Map<number, Float64Array>();
      const existing = await this.options.disk!.read(pack);
      if (existing) {
        const { radii, rowLength } = decodePackHeader(existing);
        const dataStart = existing.readUInt32LE(0) + 4;
        radii.forEach((radius, r) => {
          const row = new Float64Array(rowLength);
          Buffer.from(row.buffer).set(existing.subarray(dataStart + r * rowLength * 8, dataStart + (r + 1) * rowLength * 8));
          merged.set(radius, row);
        });
      }
      for (const [radius, row] of rows) merged.set(radius, row);
      const rowLength = rows.values().next().value!.length;
      const radii = [...merged.keys()].sort((a, b) => a - b);
      const header = Buffer.from(JSON.stringify({ radii, rowLength }));
      const data = Buffer.alloc(radii.length * rowLength * 8);
      radii.forEach((radius, r) => Buffer.from(merged.get(radius)!.buffer).copy(data, r * rowLength * 8));
      const length = Buffer.alloc(4);
      length.writeUInt32LE(header.length, 0);
      await this.options.disk!.write(pack, Buffer.concat([length, header, data]));
    } catch {
      // The disk cache is an optimisation: a failed write only costs a recomputation later.
    }
  }
}

function decodePackHeader(payload: Buffer): { radii: number[]; rowLength: number } {
  const length = payload.readUInt32LE(0);
  return JSON.parse(payload.subarray(4, 4 + length).toString("utf8")) as { radii: number[]; rowLength: number };
}
