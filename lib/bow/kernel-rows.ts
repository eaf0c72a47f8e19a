// The work of one kernel task: per-drop β⊥, β∥ = |S1|²/(2k²), |S2|²/(2k²) (Bohren & Huffman 1983 Eq. 3.12 with
// unpolarised light split evenly) for several drops at one wavelength, over lattice blocks, ψ ascending.

import type { DropEngine } from "./volume-scattering.js";
import { blockRange } from "./kernel-grid.js";
import { rowVariant } from "./cell-average.js";
import { dropRow, dropRowContext, waveNumberPerM, type CellAverage } from "./drop-rows.js";
import { mieLatticeRows } from "./mie-lattice-rows.js";
import type { MieSampling } from "./mie-sub-lattice.js";
import type { DropMedium } from "../water/drop-medium.js";
import { rotationMeanRows, shapeGroupKey, shapedMeanRows, shapedNodeRows, shapedVariant, type ShapedPlaneCount, type ShapedRowSpec } from "./shaped-rows.js";
import { orderVariant } from "./scattering-orders.js";
import { RowArena } from "./row-arena.js";

/** This thread's scratch rows for the Lorenz–Mie rows of its tasks (one task at a time per thread). */
const threadArena = new RowArena();

export interface KernelRowsInput {
  medium: DropMedium;
  h: number;
  /**
   * medium: a flattened drop's own wavelength when the task holds several (shaped items only; else `medium`).
   * cantingNode: a flattened drop's share from that canting node alone (an index into planeCantingNodes(shape); with
   * shape.cantingRotation, that slice of ROTATION_SLICES), for a
   * part of a task split in parts (pipeline/kernels/canting-parts.ts: the order group without a bow, node by node);
   * else the canting mean of its order groups.
   */
  items: { radiusUm: number; engine: DropEngine; blocks: number[]; average?: CellAverage; shape?: ShapedRowSpec; medium?: DropMedium; cantingNode?: number }[];
  /** Lattice indices (inclusive) the caller needs; samples of the blocks outside them are left as NaN. */
  within?: { first: number; last: number };
  /** One Debye order p alone for every drop (scattering-orders.ts), or undefined for the whole drops. */
  order?: number;
  /** Lorenz–Mie rows of small drops on a sub-lattice ("adaptive", the default) or at every lattice point ("lattice"). */
  mieSampling?: MieSampling;
}

/** A row's samples outside the computed range: never a kernel value, so "covered" is a NaN test. */
export const NOT_COMPUTED = Number.NaN;

export function kernelRows(input: KernelRowsInput): { rows: Float64Array[][]; mieTermAngles: number; shapedPlanes: ShapedPlaneCount; siblings?: { arcPositionDeg: number; rows: Float64Array[][] }[] } {
  const { medium, h, items } = input;
  // The engines' bins need one evenly spaced Θ grid: the task covers every lattice point from the first to the
  // last block asked for, also where the drops ask for blocks with gaps between them (a partly filled cache),
  // clipped to the range the caller needs (the outer blocks of a request are mostly outside it).
  const asked = items.flatMap((it) => it.blocks);
  const firstBlock = Math.min(...asked);
  const lastBlock = Math.max(...asked);
  const lastOfRun = blockRange(lastBlock, h);
  const lo = Math.max(input.within?.first ?? -Infinity, blockRange(firstBlock, h).first);
  const hi = Math.min(input.within?.last ?? Infinity, lastOfRun.first + lastOfRun.count - 1);
  // Θ ascending (ψ descending), as the engines want it.
  const thetaDeg = Float64Array.from({ length: hi - lo + 1 }, (_, j) => 180 - (hi - j) * h);
  const nTheta = thetaDeg.length;
  // Position in that grid of each sample of each block (−1: outside the computed range), looked up once per task.
  const positions = new Map<number, Int32Array>();
  for (let b = firstBlock; b <= lastBlock; b++) {
    const { first, count } = blockRange(b, h);
    positions.set(b, Int32Array.from({ length: count }, (_, k) => (first + k >= lo && first + k <= hi ? hi - (first + k) : -1)));
  }
  // Drops that are not spheres have their own engine (shaped-rows.ts): the sphere engines' tables are not built for them.
  if (input.order !== undefined && items.some((it) => it.shape)) throw new RangeError("rows by scattering order are for spheres only");
  if (items.some((it) => (it.medium || it.cantingNode !== undefined) && !it.shape)) throw new RangeError("an item's own medium or canting node is for flattened drops only");
  const ctx = dropRowContext(medium, thetaDeg, h, new Set(items.filter((it) => !it.shape).map((it) => it.engine)), input.order);
  const perDrop = 1 / (2 * ctx.waveNumberPerM * ctx.waveNumberPerM);
  const perp = new Float64Array(nTheta);
  const par = new Float64Array(nTheta);
  // The rows that land in one cache pack (one engine and block) share one buffer, which the pack frees as a whole:
  // one allocation instead of one per drop (garbage collection fell from 17 % to 11 % of a default-profile task).
  const packRows = new Map<number, { buffer: Float64Array; used: number }>();
  // An averaged Lorenz–Mie row is not the single-size row of the same engine: its own buffer (and cache pack).
  const variants = items.map((item) => orderVariant(shapedVariant(rowVariant(item.engine, item.average), item.shape), input.order));
  // Packs keyed by a number (variant index, block) rather than a string built from the variant: V8 dropped the
  // compiled kernelRows when the variants became built strings (averaged rows) after plain ones (string keys of a Map).
  const distinct: string[] = [];
  const variantOf = Int32Array.from(variants, (v) => {
    const k = distinct.indexOf(v);
    return k >= 0 ? k : distinct.push(v) - 1;
  });
  const blockSpan = lastBlock - firstBlock + 1;
  const packKey = (index: number, b: number) => variantOf[index] * blockSpan + (b - firstBlock);
  for (const [index, item] of items.entries()) {
    for (const b of item.blocks) {
      const key = packKey(index, b);
      const entry = packRows.get(key) ?? { buffer: new Float64Array(0), used: 0 };
      entry.used += 2 * positions.get(b)!.length;
      packRows.set(key, entry);
    }
  }
  for (const entry of packRows.values()) {
    entry.buffer = new Float64Array(entry.used);
    entry.used = 0;
  }
  // Lorenz–Mie drops all at once (the angular functions shared among them), the other engines drop by drop.
  const mieIndices = items.flatMap((item, index) => (item.engine === "mie" && !item.shape ? [index] : []));
  const mie = mieLatticeRows(ctx, mieIndices.map((i) => items[i]), { h, lo, hi }, input.mieSampling, threadArena);
  const mieRowOf = new Map(mieIndices.map((item, k) => [item, mie.rows[k]]));
  let mieTermAngles = mie.termAngles;
  const { rows: shaped, planes: shapedPlanes, siblings: siblingRows } = shapedItemRows(items, medium, thetaDeg, h);
  // Arrays built by push from empty literals (always packed elements), not by map(): the worker walks them to list the
  // buffers it moves, and arrays from map() have the elements kind of whichever tier ran it (a fog task after a rain
  // one found the other kind and threw that compiled code away).
  const rows: Float64Array[][] = [];
  for (const [index, item] of items.entries()) {
    // The computed rows are read where they are (no copy into perp, par); flattened drops' rows come scaled already,
    // node by node (shapedItemRows).
    const flattened = shaped.get(index);
    const source = flattened ?? mieRowOf.get(index) ?? { perp, par };
    const scale = flattened ? 1 : perDrop;
    if (source.perp === perp) mieTermAngles += dropRow(ctx, item.engine, item.radiusUm, perp, par, item.average);
    const itemRows: Float64Array[] = [];
    for (const b of item.blocks) {
      const at = positions.get(b)!;
      const count = at.length;
      const pack = packRows.get(packKey(index, b))!;
      const row = pack.buffer.subarray(pack.used, pack.used + 2 * count);
      pack.used += 2 * count;
      copyScaled(source.perp, source.par, at, scale, row);
      itemRows.push(row);
    }
    rows.push(itemRows);
  }
  // Rows at other places on the bow (ShapedRowSpec.siblingArcsDeg), each block in a buffer of its own.
  const siblings = [...siblingRows].map(([arcPositionDeg, byItem]) => ({
    arcPositionDeg,
    rows: items.map((item, index) => {
      const source = byItem.get(index);
      if (!source) return [];
      return item.blocks.map((b) => {
        const at = positions.get(b)!;
        const row = new Float64Array(2 * at.length);
        copyScaled(source.perp, source.par, at, 1, row);
        return row;
      });
    }),
  }));
  return { rows, mieTermAngles, shapedPlanes, ...(siblings.length ? { siblings } : {}) };
}

/** A block's β⊥ then β∥ into row: scale × the Θ-grid rows at the block's positions (NOT_COMPUTED where −1). */
function copyScaled(perp: Float64Array, par: Float64Array, at: Int32Array, scale: number, row: Float64Array): void {
  const count = at.length;
  for (let k = 0; k < count; k++) {
    const j = at[k];
    row[k] = j < 0 ? NOT_COMPUTED : scale * perp[j];
    row[count + k] = j < 0 ? NOT_COMPUTED : scale * par[j];
  }
}

/**
 * The flattened drops' rows, by item index, already in β = |S|²/(2k²): items of one shape (shapedRows: a spheroid at
 * any radius, equilibrium drops per shape node) and canting node (or all of them) are computed together, at their own
 * wavelengths, so that each scattering plane is traced once. A row is its pieces (shapedMeanRows: the group without a
 * bow node by node, each bow group's canting mean), each scaled, added in order from zero: the sum a task split in
 * parts makes of its parts' rows (pipeline/kernels/canting-parts.ts), to the last bit.
 */
function shapedItemRows(
  items: KernelRowsInput["items"],
  medium: DropMedium,
  thetaDeg: Float64Array,
  h: number,
): { rows: Map<number, { perp: Float64Array; par: Float64Array }>; planes: ShapedPlaneCount; siblings: Map<number, Map<number, { perp: Float64Array; par: Float64Array }>> } {
  const groups = new Map<string, number[]>();
  items.forEach((item, index) => {
    if (!item.shape) return;
    const key = `${shapeGroupKey(item.shape, item.radiusUm)}|${item.cantingNode ?? "all"}`;
    const group = groups.get(key) ?? [];
    group.push(index);
    groups.set(key, group);
  });
  const out = new Map<number, { perp: Float64Array; par: Float64Array }>();
  const siblings = new Map<number, Map<number, { perp: Float64Array; par: Float64Array }>>();
  const planes: ShapedPlaneCount = { traced: 0, interpolated: 0 };
  for (const group of groups.values()) {
    const first = items[group[0]];
    const drops = group.map((index) => {
      const item = items[index];
      const own = item.medium ?? medium;
      return { radiusUm: item.radiusUm, mRe: own.mRe, x: waveNumberPerM(own) * item.radiusUm * 1e-6 };
    });
    // The canting mean by rotation (its slice of elevations, in a split task), one canting node's share (a part of a
    // split task: the group without a bow), else the canting mean's pieces.
    const computed: { pieces: { perp: Float64Array; par: Float64Array }[][]; planes: ShapedPlaneCount; siblings?: { arcPositionDeg: number; pieces: { perp: Float64Array; par: Float64Array }[][] }[] } =
      first.shape!.cantingRotation
        ? rotationMeanRows(first.shape!, drops, thetaDeg, h, first.cantingNode)
        : first.cantingNode === undefined
          ? shapedMeanRows(first.shape!, drops, thetaDeg, h)
          : (({ rows, planes }) => ({ pieces: rows, planes }))(shapedNodeRows(first.shape!, drops, thetaDeg, h, [first.cantingNode]));
    planes.traced += computed.planes.traced;
    planes.interpolated += computed.planes.interpolated;
    const scaleOf = (k: number) => 1 / (2 * waveNumberPerM(items[group[k]].medium ?? medium) ** 2);
    computed.pieces.forEach((shares, k) => out.set(group[k], addedPieces(shares, scaleOf(k), thetaDeg.length)));
    for (const { arcPositionDeg, pieces } of computed.siblings ?? []) {
      let rows = siblings.get(arcPositionDeg);
      if (!rows) siblings.set(arcPositionDeg, (rows = new Map()));
      for (const [k, shares] of pieces.entries()) rows.set(group[k], addedPieces(shares, scaleOf(k), thetaDeg.length));
    }
  }
  return { rows: out, planes, siblings };
}

/** A drop's pieces (shapedMeanRows, rotationMeanRows), each scaled, added in order from zero. */
function addedPieces(shares: readonly { perp: Float64Array; par: Float64Array }[], scale: number, count: number): { perp: Float64Array; par: Float64Array } {
  const perp = new Float64Array(count);
  const par = new Float64Array(count);
  for (const share of shares) {
    for (let j = 0; j < count; j++) {
      perp[j] += scale * share.perp[j];
      par[j] += scale * share.par[j];
    }
  }
  return { perp, par };
}
