// Per-drop kernels β(ψ) on the angle lattice, computed once and reused: memory (LRU by bytes), then disk
// (content-addressed packs), then computation in worker threads. Concurrent requests for the same kernel row
// share one computation. A pack holds the rows of many drop radii for one wavelength, engine, step and block.

import { simdArithmetic } from "../../lib/mie/simd-amplitudes.js";
import type { DropEngine } from "../../lib/bow/volume-scattering.js";
import { setMaxListeners } from "node:events";
import { createHash } from "node:crypto";
import { linkAbort } from "./abort-link.js";
import type { LRUCache } from "lru-cache";
import { byteBoundedCache } from "./byte-bounded-cache.js";
import type { DiskStore } from "./disk-store.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";
import type { DropMedium } from "../../lib/water/drop-medium.js";
import { blockRange } from "../../lib/bow/kernel-grid.js";
import { rowVariant, type CellAverage } from "../../lib/bow/cell-average.js";
import { shapeGroupKey, shapedVariant, type ShapedRowSpec } from "../../lib/bow/shaped-rows.js";
import { computeInParts } from "./canting-parts.js";
import { orderVariant } from "../../lib/bow/scattering-orders.js";
import type { MieSampling } from "../../lib/bow/mie-sub-lattice.js";
import { kernelRowCostNs } from "../progress/work-costs.js";
import { sizeParameter } from "../progress/profile-work.js";

/**
 * Flattened drops' tasks (one per shape) are split in parts (canting-parts.ts) while there are fewer than this many
 * shapes per thread. With this many whole tasks per thread queued, the threads end within one task of each other, an
 * eighth of a thread's work or less, where each shape costs about the same (common practice for list scheduling: many
 * more tasks than threads); below it, parts (15 per shape with canting, 3 without) are cheaper than idle threads.
 */
const UNSPLIT_SHAPES_PER_THREAD = 8;

/**
 * The share of the memory budget kept for sums over drops (populationSums): a default profile's 41 wavelengths take
 * 0.4 MB of them against its 44 MB of rows, so a sixteenth holds the sums of far more profiles than the rest holds rows.
 */
const SUMS_BUDGET_SHARE = 1 / 16;

/** A request's sums over drops, one wavelength at a time: read-only arrays (β⊥ then β∥ over the span). */
export interface PopulationSums {
  get(wavelengthIndex: number): Float64Array | undefined;
  set(wavelengthIndex: number, sum: Float64Array): void;
}

/** Bump when the physics of a kernel row changes, so that stale cache entries are never read. */
export const KERNEL_VERSION = 5;

export type KernelCompute = (task: KernelTask, signal?: AbortSignal) => Promise<KernelTaskResult>;

export interface KernelRequest {
  h: number;
  media: DropMedium[];
  radiiUm: Float64Array;
  engines: DropEngine[];
  /** Per radius: Lorenz–Mie rows averaged over the node's radius cell (undefined: the node's own size). */
  averages?: (CellAverage | undefined)[];
  /** Per radius: the drop's shape and place on the bow when it is not a sphere (undefined: a sphere). */
  shapes?: (ShapedRowSpec | undefined)[];
  blocks: number[];
  /** Lattice indices (inclusive) the caller reads: rows need to be computed only there. */
  within: { first: number; last: number };
  /** Every row of one Debye order p alone (lib/bow/scattering-orders.ts), or undefined for the whole drops. */
  order?: number;
}

/** What a caller may ask of rows() besides the rows: to hear of them as they come, to keep each task's rows at once. */
export interface KernelWatch {
  /**
   * The rows found or computed so far and all the request needs, in estimated nanoseconds of wall time
   * (work-costs.ts over the pool's threads); found: rows read from memory, disk or Redis rather than computed.
   */
  onRows?: (doneNs: number, totalNs: number, found: boolean) => void;
  /**
   * Store each task's rows in the second tier (disk or Redis) as soon as the task ends, not after the whole
   * request: a background job whose worker dies resumes from them.
   */
  saveEachTask?: boolean;
  /**
   * Told of each wavelength l once all its rows are in hand (found, computed or borrowed), as soon as they are, with a
   * reader of them: the caller may sum that wavelength while the other tasks still compute (the main thread is idle
   * then). Wavelengths found whole in a cache are never told (nothing to wait for: the caller sums them after, a turn
   * of the event loop each). May be told again if the request recomputes rows another request failed to give.
   */
  onWavelength?: (l: number, row: (i: number, block: number) => Float64Array) => void;
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

interface InflightRow {
  task: Promise<KernelTaskResult>;
  item: number;
  block: number;
  within: { first: number; last: number };
}

class Pack {
  readonly rows = new Map<number, Float64Array>();
  byteLength = 0;
  add(radiusUm: number, row: Float64Array): void {
    const old = this.rows.get(radiusUm);
    if (old) this.byteLength -= old.byteLength;
    const kept = old ? mergeRows(old, row) : row;
    this.rows.set(radiusUm, kept);
    this.byteLength += kept.byteLength + 64;
  }
}

/** First and last computed sample of a row (β⊥ half; β∥ is computed at the same samples); null if none. */
function coverage(row: Float64Array): [number, number] | null {
  const count = row.length / 2;
  let first = 0;
  while (first < count && Number.isNaN(row[first])) first++;
  if (first === count) return null;
  let last = count - 1;
  while (Number.isNaN(row[last])) last--;
  return [first, last];
}

/** A row computed over samples k0..k1 of its block (rows cover one contiguous run of samples). */
function covers(row: Float64Array, k0: number, k1: number): boolean {
  return !Number.isNaN(row[k0]) && !Number.isNaN(row[k1]);
}

/**
 * Two computations of one row over different samples: their union where it is one contiguous run, else the
 * newer one. Samples both computed agree (same drop, same lattice point).
 */
function mergeRows(older: Float64Array, newer: Float64Array): Float64Array {
  const a = coverage(older);
  const b = coverage(newer);
  if (!a) return newer;
  if (!b) return older;
  if (b[0] <= a[0] && b[1] >= a[1]) return newer;
  if (a[0] <= b[0] && a[1] >= b[1]) return older;
  if (b[0] > a[1] + 1 || a[0] > b[1] + 1) return newer;
  const merged = Float64Array.from(older);
  for (let k = 0; k < newer.length; k++) if (!Number.isNaN(newer[k])) merged[k] = newer[k];
  return merged;
}


/** variant: the engine, and the cell average for averaged Lorenz–Mie rows (rowVariant). */
function packKey(m: DropMedium, variant: string, h: number, block: number, sampling: MieSampling): string {
  return `${rowsKeyPrefix(sampling)}|${mediumKey(m)}|${variant}|${h}|${block}`;
}

/** What every row's key starts with: the kernels' version and how their numbers were made. */
function rowsKeyPrefix(sampling: MieSampling): string {
  // Rows of the fused-arithmetic kernels (relaxed SIMD) differ from exact ones in the last bits: kept apart; so are
  // Lorenz–Mie rows computed at every lattice point (the sub-lattice's interpolated ones differ by ~1e-8 of their peak).
  return `v${KERNEL_VERSION}${simdArithmetic === "fused" ? "f" : ""}${sampling === "lattice" ? "L" : ""}`;
}

function mediumKey(m: DropMedium): string {
  return `${m.wavelengthNm}|${m.mRe}|${m.mIm}|${m.nAir}`;
}

/** Rows of one engine with different cell averages, shapes or orders are different rows: packs are per variant. */
function variantsOf(request: KernelRequest): string[] {
  const averages = request.averages ?? [];
  const shapes = request.shapes ?? [];
  return Array.from(request.radiiUm, (_, i) => orderVariant(shapedVariant(rowVariant(request.engines[i], averages[i]), shapes[i]), request.order));
}

export class KernelService {
  readonly memory: LRUCache<string, Pack>;
  /** Sums over drops by content (populationSums), within their share of the memory budget. */
  readonly sums: LRUCache<string, Float64Array>;
  /** Rows being computed: pack key → radius → the task computing it and where the row sits in its result. */
  private readonly inflight = new Map<string, Map<number, InflightRow>>();
  private readonly packLoads = new Map<string, Promise<void>>();
  /**
   * Disk writes, one after another: a write reads, merges and replaces its pack, so two must not overlap, and
   * they start only once the request that computed the rows has them all, so they never compete with its tasks.
   */
  private writes: Promise<void> = Promise.resolve();
  private queuedWrites = 0;

  constructor(
    private readonly options: {
      memoryBudgetBytes: number;
      disk?: Pick<DiskStore, "read" | "write">;
      compute: KernelCompute;
      /** Tasks that run at once (the pool's threads): the wall time of the rows is their cost over this. */
      parallelism?: number;
      /** Lorenz–Mie rows of small drops on a sub-lattice ("adaptive", the default) or at every point (benchmarks). */
      mieSampling?: MieSampling;
    },
  ) {
    this.memory = byteBoundedCache(options.memoryBudgetBytes * (1 - SUMS_BUDGET_SHARE));
    this.sums = byteBoundedCache(options.memoryBudgetBytes * SUMS_BUDGET_SHARE);
  }

  get mieSampling(): MieSampling {
    return this.options.mieSampling ?? "adaptive";
  }

  /** Kernel tasks that run at once: rows' wall time is their cost over this (progress estimates use it too). */
  get parallelism(): number {
    return Math.max(1, this.options.parallelism ?? 1);
  }

  /** Adds rows (radius → row) to a pack in memory: one cache update per pack, not per row. */
  private remember(pack: string, rows: Iterable<[number, Float64Array]>): void {
    const entry = this.memory.get(pack) ?? new Pack();
    for (const [radiusUm, row] of rows) entry.add(radiusUm, row);
    // Set again so that the cache counts the pack's new size.
    this.memory.set(pack, entry);
  }

  /**
   * Σ_i w_i β_i of a request's rows over its span, per wavelength, kept in memory by what they are made of (what
   * the rows' pack keys hold: rowsKeyPrefix, media, variants, lattice step, blocks; and the radii, span and weights):
   * a profile of the same drops in the same water over the same angles finds them whatever else it asks
   * (sun, spectrum of the light, output, observer), and skips the rows and their sum, most of a warm profile's time.
   * A sum depends on its rows alone, and rows on their keys alone, so a kept sum is never stale.
   */
  populationSums(request: KernelRequest, weightsPerM3: Float64Array): PopulationSums {
    const identity = JSON.stringify({
      rows: rowsKeyPrefix(this.mieSampling),
      h: request.h,
      blocks: request.blocks,
      within: request.within,
      radiiUm: Array.from(request.radiiUm),
      variants: variantsOf(request),
      weights: Array.from(weightsPerM3),
    });
    const base = createHash("sha256").update(identity).digest("base64url");
    const keyOf = (l: number) => `${base}|${mediumKey(request.media[l])}`;
    return { get: (l) => this.sums.get(keyOf(l)), set: (l, sum) => void this.sums.set(keyOf(l), sum) };
  }

  async rows(request: KernelRequest, signal?: AbortSignal, watch: KernelWatch = {}): Promise<KernelRows> {
    const { h, media, radiiUm, engines, blocks, within } = request;
    const averages = request.averages ?? [];
    const shapes = request.shapes ?? [];
    const variants = variantsOf(request);
    // The samples of each block the caller reads: k0..k1 in the block, first..last on the lattice.
    const need = blocks.map((b) => {
      const { first, count } = blockRange(b, h);
      const lo = Math.max(within.first, first);
      const hi = Math.min(within.last, first + count - 1);
      return { first: lo, last: hi, k0: lo - first, k1: hi - first };
    });
    const stats: KernelStats = { memoryHits: 0, diskHits: 0, computed: 0, mieTermAngles: 0 };
    const variantSet = [...new Set(variants)];
    const variantOf = Int32Array.from(variants, (v) => variantSet.indexOf(v));
    // found[l][blockIndex][i]: radius i's row, whatever engine served it (each radius has one engine). Arrays by
    // index, not maps by radius: a warm request reads tens of thousands of rows through here.
    const found = media.map(() => blocks.map(() => new Array<Float64Array | undefined>(radiiUm.length)));
    // keys[l][blockIndex][variant index]: the pack's key.
    const keys = media.map((m) => blocks.map((b) => variantSet.map((v) => packKey(m, v, h, b, this.mieSampling))));
    const keyOf = (l: number, i: number, bi: number) => keys[l][bi][variantOf[i]];

    // The rows of wavelengths from..to − 1 not in memory yet (in wavelength order, then block, then radius).
    const lookMemory = (from = 0, to = media.length) => {
      const missing: [number, number, number][] = [];
      for (let l = from; l < to; l++) {
        for (let bi = 0; bi < blocks.length; bi++) {
          const have = found[l][bi];
          const packs = keys[l][bi].map((key) => this.memory.get(key));
          for (let i = 0; i < radiiUm.length; i++) {
            if (have[i]) continue;
            const row = packs[variantOf[i]]?.rows.get(radiiUm[i]);
            if (row && covers(row, need[bi].k0, need[bi].k1)) have[i] = row;
            else missing.push([l, i, bi]);
          }
        }
      }
      return missing;
    };

    // Progress: rows found count at once, computed ones as their task ends. Counting must cost next to nothing on a
    // warm request (tens of thousands of rows found in memory): one estimate per drop and wavelength, sums per task,
    // and the rows' lengths summed once, never a loop over every row.
    const threads = this.parallelism;
    // Per wavelength and drop: the cost of one lattice sample of its row (the rows of one drop differ only in length;
    // a flattened drop's fixed cost per plane is spread over all the samples it is computed for).
    const samplesOf = need.map((n) => n.last - n.first + 1);
    const allSamples = samplesOf.reduce((a, b) => a + b, 0);
    const perSample = watch.onRows
      ? media.map((m) =>
          Array.from(radiiUm, (r, i) => kernelRowCostNs(engines[i], sizeParameter(m, r), allSamples, averages[i]?.samples ?? 1, shapes[i], media.length) / allSamples / threads),
        )
      : [];
    const cost = (l: number, i: number, bi: number) => perSample[l][i] * samplesOf[bi];
    const costOf = (list: [number, number, number][]) => list.reduce((sum, [l, i, bi]) => sum + cost(l, i, bi), 0);
    let totalNs = 0;
    if (watch.onRows) {
      // Every drop asks for every block: the total is Σ over drops and wavelengths of the per-sample cost × all samples.
      for (const row of perSample) for (const ns of row) totalNs += ns * allSamples;
    }
    let doneNs = 0;
    const done = (ns: number, found: boolean) => {
      doneNs += ns;
      watch.onRows?.(doneNs, totalNs, found);
    };

    // Without a second tier, progress or flattened drops, each wavelength is looked up in memory, grouped and sent in
    // turn (below), so that the threads start on the first wavelength's task while the others are looked up (a cold
    // fog profile looks up ~19,000 rows). Otherwise every row is looked up first.
    const pipelined = !this.options.disk && !watch.onRows && !shapes.some(Boolean);
    let missing = pipelined ? [] : lookMemory();
    if (!pipelined) stats.memoryHits = media.length * radiiUm.length * blocks.length - missing.length;
    if (missing.length && this.options.disk) {
      const packs = new Set(missing.map(([l, i, bi]) => keyOf(l, i, bi)));
      await Promise.all([...packs].map((p) => this.loadPack(p)));
      const before = missing.length;
      missing = lookMemory();
      stats.diskHits = before - missing.length;
    }
    // Everything found in memory, on disk or in Redis counts at once, in one report.
    if (watch.onRows) done(missing.length === 0 ? totalNs : totalNs - costOf(missing), true);

    // Rows another request is computing already are awaited, not computed twice. In-flight rows point at the
    // task that computes them (one promise per task, not per row: a cold profile has ~50,000 rows).
    const waits: Promise<void>[] = [];
    // Rows still to come per wavelength: a wavelength is told (watch.onWavelength) when its count reaches zero.
    const toCome = new Int32Array(media.length);
    for (const [l] of missing) toCome[l]++;
    // Block number → its index in `blocks` (−1: not asked for), by offset from the lowest.
    const lowestBlock = blocks.length ? Math.min(...blocks) : 0;
    const blockIndexOf = new Int32Array(blocks.length ? Math.max(...blocks) - lowestBlock + 1 : 0).fill(-1);
    blocks.forEach((b, bi) => (blockIndexOf[b - lowestBlock] = bi));
    const bi0 = (b: number) => blockIndexOf[b - lowestBlock] ?? -1;
    const readerOf = (l: number) => (i: number, b: number) => found[l][bi0(b)][i]!;
    const arrived = (l: number) => {
      if (--toCome[l] === 0) watch.onWavelength?.(l, readerOf(l));
    };
    // Rows to compute, grouped into tasks: task key (a sphere's wavelength l, a flattened drop's shape) → l·radii + i →
    // the row's wavelength, radius and blocks. Numbers, not built strings: a cold fog profile groups ~19,000 rows here.
    const toCompute = new Map<number | string, Map<number, { l: number; i: number; bis: number[] }>>();
    // Flattened drops' tasks: one per shape at every wavelength; where there are few shapes for the threads, each is
    // split in parts by canting node and order group, queued largest first (canting-parts.ts), so that every thread
    // stays busy to the end and every plane's order is still traced once.
    const shapesMissing = new Set(shapes.some(Boolean) ? missing.flatMap(([, i]) => (shapes[i] ? [shapeGroupKey(shapes[i]!, radiiUm[i])] : [])) : []);
    const splitShapes = this.parallelism > 1 && shapesMissing.size < UNSPLIT_SHAPES_PER_THREAD * this.parallelism;

    // One failed task stops this request's other tasks; the caller's signal (client gone) stops them all.
    const stop = new AbortController();
    setMaxListeners(0, stop.signal);
    // One listener on the caller's signal for all the requests that share it (abort-link.ts), removed below.
    const unlink = linkAbort(signal, stop);
    const tasks: Promise<void>[] = [];
    const toSave: [string, Map<number, Float64Array>][] = [];
    const send = (rowsOfTask: Map<number, { l: number; i: number; bis: number[] }>) => {
      const entries = [...rowsOfTask.values()];
      // One wavelength per task, but for flattened drops: their tasks hold one shape's rows at many wavelengths, each
      // item then with its own medium (lib/bow/shaped-rows.ts traces a plane at a few indices and interpolates).
      const manyMedia = entries.some((e) => e.l !== entries[0].l);
      const items = entries.map(({ l, i, bis }) => ({
        radiusUm: radiiUm[i],
        engine: engines[i],
        average: averages[i],
        shape: shapes[i],
        blocks: bis.map((bi) => blocks[bi]),
        ...(manyMedia ? { medium: media[l] } : {}),
      }));
      const spec: KernelTask = {
        medium: media[entries[0].l],
        h,
        items,
        within,
        ...(request.order === undefined ? {} : { order: request.order }),
        ...(this.mieSampling === "adaptive" ? {} : { mieSampling: this.mieSampling }),
      };
      const taskNs = watch.onRows ? entries.reduce((sum, { l, i, bis }) => sum + bis.reduce((s, bi) => s + cost(l, i, bi), 0), 0) : 0;
      // A split task's progress moves part by part, by each part's estimated share of the task.
      const inParts = items[0].shape !== undefined && splitShapes;
      const computing = inParts
        ? computeInParts(spec, this.options.compute, stop.signal, watch.onRows ? (share) => done(taskNs * share, false) : undefined)
        : this.options.compute(spec, stop.signal);
      computing.catch(() => undefined);
      // The task's rows grouped by the pack they belong to (one wavelength and one block per pack).
      const byPack = new Map<string, { l: number; bi: number; rows: [radiusUm: number, item: number, block: number, i: number][] }>();
      entries.forEach(({ l, i, bis }, item) => {
        bis.forEach((bi, block) => {
          const pack = keyOf(l, i, bi);
          let entry = byPack.get(pack);
          if (!entry) byPack.set(pack, (entry = { l, bi, rows: [] }));
          entry.rows.push([radiiUm[i], item, block, i]);
          let rows = this.inflight.get(pack);
          if (!rows) this.inflight.set(pack, (rows = new Map()));
          rows.set(radiiUm[i], { task: computing, item, block, within });
        });
      });
      const task = computing
        .then((result) => {
          // A task that ends after its request was cancelled keeps nothing: a cancelled job stops adding kernels.
          if (stop.signal.aborted) return;
          stats.mieTermAngles += result.mieTermAngles;
          const saved: [string, Map<number, Float64Array>][] = [];
          for (const [pack, { l, bi, rows: list }] of byPack) {
            const rows = list.map(([radiusUm, item, block]): [number, Float64Array] => [radiusUm, result.rows[item][block]]);
            this.remember(pack, rows);
            list.forEach(([, , , i], k) => (found[l][bi][i] = rows[k][1]));
            stats.computed += rows.length;
            if (this.options.disk) saved.push([pack, new Map(rows)]);
          }
          // Rows the same pass gave at other places on the bow (ShapedRowSpec.siblingArcsDeg): kept as that place's rows.
          for (const sibling of result.siblings ?? []) {
            for (const { l, bi, rows: list } of byPack.values()) {
              const rows = list.flatMap(([radiusUm, item, block]): [number, Float64Array][] => (sibling.rows[item]?.[block] ? [[radiusUm, sibling.rows[item][block]]] : []));
              if (rows.length === 0) continue;
              const i = list[0][3];
              const spec = { ...shapes[i]!, arcPositionDeg: sibling.arcPositionDeg };
              const pack = packKey(media[l], orderVariant(shapedVariant(rowVariant(engines[i], averages[i]), spec), request.order), h, blocks[bi], this.mieSampling);
              this.remember(pack, rows);
              if (this.options.disk) saved.push([pack, new Map(rows)]);
            }
          }
          if (watch.saveEachTask) this.queueWrites(saved);
          else toSave.push(...saved);
          if (watch.onRows && !inParts) done(taskNs, false);
          if (watch.onWavelength) for (const { rows: list, l } of byPack.values()) for (let k = 0; k < list.length; k++) arrived(l);
        })
        .catch((error: unknown) => {
          stop.abort(error);
          throw error;
        })
        .finally(() => {
          for (const [pack, { rows: list }] of byPack) {
            const rows = this.inflight.get(pack);
            if (!rows) continue;
            for (const [radiusUm] of list) if (rows.get(radiusUm)?.task === computing) rows.delete(radiusUm);
            if (rows.size === 0) this.inflight.delete(pack);
          }
        });
      tasks.push(task);
    };
    // A row to compute joins its task; a row another request computes is awaited.
    const group = (l: number, i: number, bi: number) => {
      const pending = this.inflight.get(keyOf(l, i, bi))?.get(radiiUm[i]);
      if (pending && pending.within.first <= need[bi].first && pending.within.last >= need[bi].last) {
        waits.push(
          pending.task.then((result) => {
            found[l][bi][i] = result.rows[pending.item][pending.block];
            if (watch.onRows) done(cost(l, i, bi), false);
            arrived(l);
          }),
        );
        return;
      }
      const taskKey = shapes[i] ? `shape|${shapeGroupKey(shapes[i]!, radiiUm[i])}` : l;
      let rowsOfTask = toCompute.get(taskKey);
      if (!rowsOfTask) toCompute.set(taskKey, (rowsOfTask = new Map()));
      const at = l * radiiUm.length + i;
      let entry = rowsOfTask.get(at);
      if (!entry) rowsOfTask.set(at, (entry = { l, i, bis: [] }));
      entry.bis.push(bi);
    };
    const sendWavelength = (l: number) => {
      const rowsOfTask = toCompute.get(l);
      if (rowsOfTask) send(rowsOfTask);
      toCompute.delete(l);
    };
    if (pipelined) {
      for (let l = 0; l < media.length; l++) {
        const rows = lookMemory(l, l + 1);
        stats.memoryHits += radiiUm.length * blocks.length - rows.length;
        toCome[l] = rows.length;
        for (const [, i, bi] of rows) group(l, i, bi);
        sendWavelength(l);
      }
    } else {
      // Tasks are sent as soon as they are grouped: a sphere's task (one wavelength) once the rows of the next
      // wavelength start (missing is in wavelength order), so that the threads start while the rest is grouped.
      // Flattened drops' tasks span every wavelength: with them, every task is sent after the grouping, in the order
      // first asked for.
      const early = shapesMissing.size === 0;
      let grouping = -1;
      for (const [l, i, bi] of missing) {
        if (early && l !== grouping) {
          sendWavelength(grouping);
          grouping = l;
        }
        group(l, i, bi);
      }
      for (const rowsOfTask of toCompute.values()) send(rowsOfTask);
    }
    // Settle borrowed rows from the start, so that their failure is never an unhandled rejection.
    const borrowedSettled = Promise.allSettled(waits);
    try {
      await Promise.all(tasks);
      // Tasks that ended after a cancellation kept nothing (above): the request ends with its signal's reason.
      stop.signal.throwIfAborted();
    } catch (error) {
      await Promise.allSettled(tasks);
      throw error;
    } finally {
      unlink();
      this.queueWrites(toSave);
    }
    // Rows borrowed from another request fail with it if that client went away: compute them for this one.
    const borrowed = await borrowedSettled;
    if (borrowed.some((r) => r.status === "rejected")) {
      signal?.throwIfAborted();
      return this.rows(request, signal, watch);
    }
    return {
      get: (l, i, b) => {
        const row = found[l][bi0(b)]?.[i];
        if (!row) throw new Error(`kernel row missing for wavelength ${l}, radius ${i}, block ${b}`);
        return row;
      },
      stats,
    };
  }

  private queueWrites(packs: [string, Map<number, Float64Array>][]): void {
    for (const [pack, rows] of packs) {
      this.queuedWrites++;
      this.writes = this.writes.then(() => this.savePack(pack, rows)).finally(() => void this.queuedWrites--);
    }
  }

  /** Resolves when every disk write queued so far has finished (writes never hold up a response). */
  async flush(): Promise<void> {
    while (this.queuedWrites > 0) await this.writes;
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
    this.remember(pack, decodePack(payload));
  }

  private async savePack(pack: string, rows: Map<number, Float64Array>): Promise<void> {
    try {
      const existing = await this.options.disk!.read(pack);
      const merged = existing ? decodePack(existing) : new Map<number, Float64Array>();
      for (const [radius, row] of rows) merged.set(radius, merged.has(radius) ? mergeRows(merged.get(radius)!, row) : row);
      await this.options.disk!.write(pack, encodePack(merged));
    } catch {
      // The disk cache is an optimisation: a failed write only costs a recomputation later.
    }
  }
}

/**
 * Pack payload: u32 header length, JSON {radii, rowLength} padded with spaces so that the rows start 8-byte aligned
 * (the disk store's header is a multiple of 8 bytes), then the rows as little-endian float64 — as pieces (views of the rows,
 * not copies) for the store to write one after another.
 */
function encodePack(rows: Map<number, Float64Array>): Buffer[] {
  const rowLength = rows.values().next().value!.length;
  const radii = [...rows.keys()].sort((a, b) => a - b);
  const json = JSON.stringify({ radii, rowLength });
  const header = Buffer.from(json.padEnd(json.length + ((8 - ((4 + json.length) % 8)) % 8), " "));
  const length = Buffer.alloc(4);
  length.writeUInt32LE(header.length, 0);
  return [length, header, ...radii.map((radius) => {
    const row = rows.get(radius)!;
    return Buffer.from(row.buffer, row.byteOffset, rowLength * 8);
  })];
}

/**
 * The rows of a pack payload, as views of its own bytes when they are 8-byte aligned in memory (a file read whole
 * into its own buffer), else of one aligned copy: no allocation per row, and none per pack when aligned.
 */
function decodePack(payload: Buffer): Map<number, Float64Array> {
  const length = payload.readUInt32LE(0);
  const { radii, rowLength } = JSON.parse(payload.subarray(4, 4 + length).toString("utf8")) as { radii: number[]; rowLength: number };
  const start = 4 + length;
  const count = radii.length * rowLength;
  let data: Float64Array;
  if ((payload.byteOffset + start) % 8 === 0) {
    data = new Float64Array(payload.buffer, payload.byteOffset + start, count);
  } else {
    data = new Float64Array(count);
    new Uint8Array(data.buffer).set(payload.subarray(start, start + data.byteLength));
  }
  const out = new Map<number, Float64Array>();
  radii.forEach((radius, r) => out.set(radius, data.subarray(r * rowLength, (r + 1) * rowLength)));
  return out;
}
