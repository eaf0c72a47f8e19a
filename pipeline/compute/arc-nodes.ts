// The arc positions at which a view, sky map or lookup texture of flattened drops computes its profiles; pixels
// (and shaders) blend between them (lib/view/arc-slices.ts).

/**
 * Spacing of the arc nodes, degrees. Each node is a full profile of shaped kernel rows (seconds per drop size and
 * wavelength), so nodes are few; the peak-aligned blend between them keeps the error small: measured in
 * test/pipeline/compute/flattened-view.test.ts (see ARC_TOLERANCE).
 */
export const ARC_NODE_STEP_DEG = 10;

export const ARC_INTERPOLATION =
  "per pixel, between the two nodes about its arc position, linear in arc position; ψ is warped piecewise linearly so that both nodes' primary and secondary luminance peaks land on the pixel's own (peaks interpolated linearly in arc position), so a bow that moves along the arc stays one bow";

export const ARC_TOLERANCE =
  "at a node the pixel equals that node's profile; half-way between nodes 10° apart (2 mm drops, sun 10°) the blend's luminance is within 10 % of the peak of a profile computed there, and its peaks within 0.2° (test/pipeline/compute/flattened-view.test.ts)";

/** Nodes every ARC_NODE_STEP_DEG that cover the arc positions seen, from the one at or below the least to the one at or above the largest. */
export function arcNodesDeg(seen: { minDeg: number; maxDeg: number }): number[] {
  const step = ARC_NODE_STEP_DEG;
  const first = Math.max(0, Math.floor(seen.minDeg / step + 1e-9) * step);
  const last = Math.min(180, Math.ceil(seen.maxDeg / step - 1e-9) * step);
  const nodes: number[] = [];
  for (let a = first; a <= last + 1e-9; a += step) nodes.push(a);
  return nodes;
}
