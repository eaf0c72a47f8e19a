// The kernel rows of several profiles over one lattice span asked for at once (a lookup texture's rows): one task per
// wavelength then carries every drop of every profile, so the work that does not depend on the drop's size (the
// Airy engine's bow tables and ray bins, the Lorenz–Mie angular functions) is done once per wavelength, not once per
// profile. Each profile gets a view of the shared rows indexed as its own request.

import type { KernelRequest, KernelRows, KernelService, KernelWatch } from "./kernel-service.js";
import { rowVariant } from "../../lib/bow/cell-average.js";
import { shapedVariant } from "../../lib/bow/shaped-rows.js";

function sameLattice(a: KernelRequest, b: KernelRequest): boolean {
  return (
    a.h === b.h &&
    a.within.first === b.within.first &&
    a.within.last === b.within.last &&
    a.blocks.length === b.blocks.length &&
    a.blocks.every((x, i) => x === b.blocks[i]) &&
    a.media.length === b.media.length &&
    a.media.every((m, l) => {
      const o = b.media[l];
      return m.wavelengthNm === o.wavelengthNm && m.mRe === o.mRe && m.mIm === o.mIm && m.nAir === o.nAir;
    })
  );
}

interface Layer {
  radiiUm: number[];
  engines: KernelRequest["engines"];
  averages: NonNullable<KernelRequest["averages"]>;
  shapes: NonNullable<KernelRequest["shapes"]>;
  /** radius → (variant of the row kept there) and its index in the layer. */
  index: Map<number, { variant: string; at: number }>;
}

/**
 * Rows for each request, computed together where the requests share their lattice (step, blocks, range and
 * wavelengths); otherwise one after another. A radius asked for with two variants (another engine or cell
 * average) goes to a second layer, since a kernel request holds one row per radius.
 */
export async function sharedKernelRows(kernels: KernelService, requests: KernelRequest[], signal?: AbortSignal, watch: KernelWatch = {}): Promise<KernelRows[]> {
  if (requests.length === 0) return [];
  if (!requests.every((r) => sameLattice(requests[0], r))) {
    const out: KernelRows[] = [];
    for (const r of requests) out.push(await kernels.rows(r, signal, watch));
    return out;
  }
  const layers: Layer[] = [];
  const placed = requests.map((r) =>
    Array.from(r.radiiUm, (radiusUm, i) => {
      const variant = shapedVariant(rowVariant(r.engines[i], r.averages?.[i]), r.shapes?.[i]);
      let layer = layers.findIndex((l) => (l.index.get(radiusUm)?.variant ?? variant) === variant);
      if (layer < 0) layer = layers.push({ radiiUm: [], engines: [], averages: [], shapes: [], index: new Map() }) - 1;
      const target = layers[layer];
      let entry = target.index.get(radiusUm);
      if (!entry) {
        entry = { variant, at: target.radiiUm.length };
        target.index.set(radiusUm, entry);
        target.radiiUm.push(radiusUm);
        target.engines.push(r.engines[i]);
        target.averages.push(r.averages?.[i]);
        target.shapes.push(r.shapes?.[i]);
      }
      return { layer, at: entry.at };
    }),
  );
  // The layers' progress adds up: each reports its own share, summed here.
  const progress = layers.map(() => ({ doneNs: 0, totalNs: 0 }));
  const shared = await Promise.all(
    layers.map((layer, k) =>
      kernels.rows(
        { ...requests[0], radiiUm: Float64Array.from(layer.radiiUm), engines: layer.engines, averages: layer.averages, shapes: layer.shapes },
        signal,
        {
          saveEachTask: watch.saveEachTask,
          onRows: watch.onRows
            ? (doneNs, totalNs, found) => {
                progress[k] = { doneNs, totalNs };
                watch.onRows!(
                  progress.reduce((s, p) => s + p.doneNs, 0),
                  progress.reduce((s, p) => s + p.totalNs, 0),
                  found,
                );
              }
            : undefined,
        },
      ),
    ),
  );
  const stats = { memoryHits: 0, diskHits: 0, computed: 0, mieTermAngles: 0 };
  for (const s of shared) for (const key of Object.keys(stats) as (keyof typeof stats)[]) stats[key] += s.stats[key];
  return placed.map((where) => ({
    get: (l, i, b) => shared[where[i].layer].get(l, where[i].at, b),
    stats,
  }));
}
