// A kernel task of one flattened-drop shape spread over several threads by canting node: each part traces its
// nodes' planes (at the water's refractive-index nodes, lib/bow/shaped-rows.ts tracedIndices) for every wavelength, and the
// rows are their shares added in node order. Split by wavelength instead, every part would trace every node's planes.

import { cantingNodesFive } from "../../lib/drops/shape/canting.js";
import { shapedRowKey } from "../../lib/bow/shaped-rows.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";

/** Canting nodes 0…count−1 in `parts` runs of consecutive nodes, as even as they go (fewer when there are fewer nodes). */
export function cantingRuns(count: number, parts: number): number[][] {
  const runs = Math.max(1, Math.min(count, parts));
  return Array.from({ length: runs }, (_, r) => {
    const from = Math.floor((r * count) / runs);
    const to = Math.floor(((r + 1) * count) / runs);
    return Array.from({ length: to - from }, (_, k) => from + k);
  });
}

/** How many parts a task of flattened drops of this canting spread can be split into. */
export function cantingNodeCount(cantingSdDeg: number): number {
  return cantingNodesFive(cantingSdDeg).length;
}

/**
 * The task (every item of one shape and canting spread) computed in `parts` tasks by canting node, with `compute`:
 * its rows are each item's node shares (kernelRows with item.cantingNode, each already scaled) added in node order
 * from zero, as kernelRows adds them for the whole task, so the rows are the same to the last bit.
 */
export async function computeByCantingNode(
  task: KernelTask,
  parts: number,
  compute: (task: KernelTask, signal?: AbortSignal) => Promise<KernelTaskResult>,
  signal?: AbortSignal,
): Promise<KernelTaskResult> {
  const shape = task.items[0]?.shape;
  if (!shape || task.items.some((item) => !item.shape || shapedRowKey(item.shape) !== shapedRowKey(shape) || item.cantingNode !== undefined)) {
    throw new RangeError("a task split by canting node holds flattened drops of one shape spec, whole");
  }
  const runs = cantingRuns(cantingNodeCount(shape.cantingSdDeg), parts);
  if (runs.length === 1) return compute(task, signal);
  const results = await Promise.all(
    runs.map((nodes) => compute({ ...task, items: task.items.flatMap((item) => nodes.map((cantingNode) => ({ ...item, cantingNode }))) }, signal)),
  );
  const rows = task.items.map((item, i) =>
    item.blocks.map((_, b) => {
      let sum: Float64Array | undefined;
      runs.forEach((nodes, r) => {
        nodes.forEach((_, k) => {
          const share = results[r].rows[i * nodes.length + k][b];
          if (!sum) sum = new Float64Array(share.length);
          for (let t = 0; t < share.length; t++) sum[t] += share[t];
        });
      });
      return sum!;
    }),
  );
  const traced = results.reduce((s, r) => s + (r.shapedPlanes?.traced ?? 0), 0);
  const interpolated = results.reduce((s, r) => s + (r.shapedPlanes?.interpolated ?? 0), 0);
  return { rows, mieTermAngles: results.reduce((s, r) => s + r.mieTermAngles, 0), shapedPlanes: { traced, interpolated } };
}
