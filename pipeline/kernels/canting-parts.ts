// A kernel task of one flattened-drop shape spread over the pool's threads in parts: the order group without a bow
// (reflection and transmission) one part per canting node, each bow group one part over every canting node (its
// canting mean aligns the nodes' bows: lib/bow/canting-spread.ts, so its nodes stay together). Each part traces its
// planes for its group's orders alone (at the water's refractive-index nodes, tracedIndices) for every wavelength, so
// no plane's order is traced twice, and the rows are the parts' pieces added in (group, node) order, as kernelRows adds
// them for the whole task (lib/bow/shaped-rows.ts shapedMeanRows). Split by wavelength instead, every part would trace
// every plane.

import { planeCantingNodes } from "../../lib/bow/plane-canting-nodes.js";
import { isBowGroup, SHAPED_ORDER_GROUPS, shapedRowKey, type ShapedRowSpec } from "../../lib/bow/shaped-rows.js";
import type { KernelTask, KernelTaskResult } from "./kernel-types.js";
import { ROTATION_SLICES, rotationElevationsDeg } from "../../lib/bow/canting-rotation.js";

export interface ShapedPart {
  /** Index into planeCantingNodes(spec), or the slice of the canting mean by rotation; undefined: every node (a bow group's part). */
  node?: number;
  /** Index into SHAPED_ORDER_GROUPS. */
  group: number;
  /** Estimated share of the task's CPU (the parts' shares add up to 1). */
  share: number;
}

/**
 * Relative CPU of each order group's part (SHAPED_ORDER_GROUPS order), which sets the order the parts are queued in:
 * measured on P4 (bench/profiles.ts: 1 mm equilibrium drops, canting 7.5°, top of the bow, 41 wavelengths; every
 * part on one thread, bench/shaped-parts.ts, BENCHMARKS.md shaped-parts), reflection and transmission took 1.2–1.4 s
 * of CPU over the five canting nodes, the primary's order 3.8 s and the secondary's 3.5–3.9 s (load average 7.6; before
 * the in-plane search's chord steps, lib/rays/plane-sweep.ts: 1.0–1.1, 2.8–3.0 and 2.8–2.9 s).
 */
export const ORDER_GROUP_COST: readonly number[] = [0.34, 1, 1];
/**
 * Every part of a shape's task (the group without a bow per canting node, each bow group whole), largest first by estimated cost, so that the pool, which
 * runs tasks in the order they come (firstInFirstOut in worker-pool.ts), runs them longest-processing-time first: the threads then end within
 * about one of the smallest parts of each other (Graham 1969, SIAM J. Appl. Math. 17, 416–429: at most 4/3 − 1/(3m) of
 * the best schedule on m threads; from memory).
 */
export function shapedParts(spec: Pick<ShapedRowSpec, "cantingSdDeg" | "sunElevationDeg" | "arcPositionDeg" | "cantingBand" | "cantingRotation">): ShapedPart[] {
  // The canting mean by rotation: every order at once, in slices of the sun's relative elevations of about equal cost
  // (each slice traces the whole pupil at each of its elevations); `node` is the slice.
  if (spec.cantingRotation) {
    const sizes = Array.from({ length: ROTATION_SLICES }, (_, k) => rotationElevationsDeg(spec.cantingSdDeg, k).length);
    const total = sizes.reduce((a, b) => a + b, 0);
    return sizes.map((size, node) => ({ node, group: 0, share: size / total })).filter((p) => p.share > 0);
  }
  // Every node costs alike: none is traced with its axis in the scattering plane (lib/bow/off-mirror-axis.ts), where
  // the plane was a mirror plane of the drop and its nodes took 1.25–1.3 times less (P4, before engine 17).
  const nodes = planeCantingNodes(spec);
  const parts: ShapedPart[] = SHAPED_ORDER_GROUPS.flatMap((_, group) =>
    isBowGroup(group) ? [{ group, share: nodes.length * ORDER_GROUP_COST[group] }] : nodes.map((_, node) => ({ node, group, share: ORDER_GROUP_COST[group] })),
  );
  const total = parts.reduce((s, p) => s + p.share, 0);
  return parts.map((p) => ({ ...p, share: p.share / total })).sort((a, b) => b.share - a.share || a.group - b.group || (a.node ?? -1) - (b.node ?? -1));
}

/**
 * The task (every item of one shape and canting spread, whole) computed in its shapedParts with `compute`, each part
 * submitted largest first; onPart hears each part's estimated share as it ends (progress). Its rows are each item's
 * pieces (kernelRows with shape.orderGroup and, for the group without a bow, item.cantingNode; each already scaled)
 * added from zero in group order and, within a group, node order, as kernelRows adds them for the whole task: the same
 * rows to the last bit.
 */
export async function computeInParts(
  task: KernelTask,
  compute: (task: KernelTask, signal?: AbortSignal) => Promise<KernelTaskResult>,
  signal?: AbortSignal,
  onPart?: (share: number) => void,
): Promise<KernelTaskResult> {
  const shape = task.items[0]?.shape;
  const whole = (item: KernelTask["items"][number]) => item.shape && item.cantingNode === undefined && item.shape.orderGroup === undefined;
  if (!shape || task.items.some((item) => !whole(item) || shapedRowKey(item.shape!) !== shapedRowKey(shape))) {
    throw new RangeError("a task split in parts holds flattened drops of one shape spec, whole");
  }
  const parts = shapedParts(shape);
  const results = await Promise.all(
    parts.map(async ({ node, group, share }) => {
      const items = task.items.map((item) => ({ ...item, shape: { ...item.shape!, orderGroup: group }, cantingNode: node }));
      const result = await compute({ ...task, items }, signal);
      onPart?.(share);
      return result;
    }),
  );
  // Added in (group, node) order, whatever order the parts were queued and ended in.
  const order = parts.map((_, k) => k).sort((a, b) => parts[a].group - parts[b].group || (parts[a].node ?? -1) - (parts[b].node ?? -1));
  // Each item's block rows added from zero in that order: the task's own rows, and the rows at other places on the bow
  // (the canting mean by rotation's siblings) alike.
  const added = (rowsOf: (result: KernelTaskResult) => Float64Array[][]) =>
    rowsOf(results[0]).map((blocks, i) =>
      blocks.map((first, b) => {
        const sum = new Float64Array(first.length);
        for (const k of order) {
          const share = rowsOf(results[k])[i][b];
          for (let t = 0; t < share.length; t++) sum[t] += share[t];
        }
        return sum;
      }),
    );
  const rows = added((result) => result.rows);
  const siblings = (results[0].siblings ?? []).map(({ arcPositionDeg }, s) => ({ arcPositionDeg, rows: added((result) => result.siblings![s].rows) }));
  const traced = results.reduce((s, r) => s + (r.shapedPlanes?.traced ?? 0), 0);
  const interpolated = results.reduce((s, r) => s + (r.shapedPlanes?.interpolated ?? 0), 0);
  return { rows, mieTermAngles: results.reduce((s, r) => s + r.mieTermAngles, 0), shapedPlanes: { traced, interpolated }, ...(siblings.length ? { siblings } : {}) };
}
