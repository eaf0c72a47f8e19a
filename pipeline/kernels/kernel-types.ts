import type { DropEngine } from "../../lib/bow/volume-scattering.js";
import type { CellAverage } from "../../lib/bow/drop-rows.js";
import type { ShapedPlaneCount, ShapedRowSpec } from "../../lib/bow/shaped-rows.js";
import type { MieSampling } from "../../lib/bow/mie-sub-lattice.js";
import type { DropMedium } from "../../lib/water/drop-medium.js";


export interface KernelTaskItem {
  radiusUm: number;
  engine: DropEngine;
  blocks: number[];
  /** Lorenz–Mie rows only: the row is the mean over sizes spread across the node's radius cell. */
  average?: CellAverage;
  /** Drops that are not spheres: shape, canting and place on the bow (lib/bow/shaped-rows.ts); engine is then ignored. */
  shape?: ShapedRowSpec;
  /** Flattened drops only: the item's own wavelength, when the task holds one shape's rows at several (else the task's). */
  medium?: DropMedium;
  /** Flattened drops only: that canting node's share alone (a task split by canting node: canting-parts.ts). */
  cantingNode?: number;
}

/**
 * One wavelength, several drops, each over some lattice blocks: the unit of work sent to a worker. Flattened drops'
 * tasks hold one shape at several wavelengths instead (items with their own medium).
 */
export interface KernelTask {
  medium: DropMedium;
  h: number;
  items: KernelTaskItem[];
  /** Lattice indices (inclusive) needed; the blocks' other samples are not computed. */
  within: { first: number; last: number };
  /** One Debye order p alone (lib/bow/scattering-orders.ts), or undefined for the whole drops. */
  order?: number;
  /** Lorenz–Mie rows at every lattice point ("lattice"), or small drops on a sub-lattice (the default, lib/bow/mie-sub-lattice.ts). */
  mieSampling?: MieSampling;
}

/** rows[item][block]: β⊥ then β∥ per drop (m² sr⁻¹) over the block's lattice points, ψ ascending; NaN where not computed. */
export interface KernelTaskResult {
  rows: Float64Array[][];
  mieTermAngles: number;
  /** Flattened drops' scattering planes traced and interpolated across the index (lib/bow/shaped-rows.ts). */
  shapedPlanes?: ShapedPlaneCount;
  /**
   * Rows of the items at other places on the bow, from the same pass (ShapedRowSpec.siblingArcsDeg): rows[item][block]
   * as `rows` (an item without that sibling: no blocks).
   */
  siblings?: { arcPositionDeg: number; rows: Float64Array[][] }[];
}
