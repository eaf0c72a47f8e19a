// The arc positions at which a view, sky map or lookup texture of flattened drops computes its profiles; pixels
// (and shaders) blend between them (lib/view/arc-slices.ts).

/**
 * Spacing of the arc nodes, degrees. Each node is a full profile of shaped kernel rows (seconds per drop size and
 * wavelength), so nodes are few. Measured with bench/arc-interpolation.ts (npm run bench:arc; 2 mm drops, sun 10°,
 * two wavelengths: sharp bows, the hardest case), the peak-aligned blend half-way between nodes against a profile
 * computed there, summed |ΔY| over summed Y: 5° apart 0.022 (top, 0°–5°), 0.051 (40°–45°), 0.035 (80°–85°);
 * 10° apart 0.098, 0.107, 0.075 (a plain blend: 0.21 and 0.34 at 40°–45° and 40°–50°). 5° halves the error of 10°
 * for twice the work. In colour, on showers (bench/arc-colour.ts, BENCHMARKS.md arc-colour: Marshall–Palmer 2 and
 * 25 mm/h, equilibrium shapes without canting, sun 10°, ψ 30–56°, half-way between 40° and 45°), the blend is off by
 * ΔE2000 7.9 and 19 at worst (inside the primary, ψ ≈ 37.5°), 1.2 and 4.2 on average; nodes 2.5° apart: 2.7 and 9.1
 * at worst, 0.41 and 1.4 on average. The error falls about as the spacing squared (single sizes' rows move smoothly but not linearly
 * with arc position), so a worst below 0.5 would need nodes about 1° apart: 5× the profiles of a view. Aligning the
 * peaks changes the mean by a few per cent on showers (their bows are broad).
 */
export const ARC_NODE_STEP_DEG = 5;

export const ARC_INTERPOLATION =
  "per pixel, between the two nodes about its arc position, linear in arc position; ψ is warped piecewise linearly so that both nodes' primary and secondary luminance peaks land on the pixel's own (peaks interpolated linearly in arc position), so a bow that moves along the arc stays one bow";

export const ARC_TOLERANCE =
  "at a node a pixel is that node's profile (float32 round-off); half-way between nodes, against a profile computed there (2 mm drops, sun 10°, two wavelengths: sharp bows), the summed luminance error is 2–5 % of the summed luminance and the largest error at one angle 11–32 % of the peak, where the bow's edge moves (bench/arc-interpolation.ts); in colour, on Marshall–Palmer 2 and 25 mm/h showers of equilibrium drops without canting, ΔE2000 1.2 and 4.2 on average, 7.9 and 19 at worst inside the primary (bench/arc-colour.ts)";

/** Nodes every ARC_NODE_STEP_DEG that cover the arc positions seen, from the one at or below the least to the one at or above the largest. */
export function arcNodesDeg(seen: { minDeg: number; maxDeg: number }): number[] {
  const step = ARC_NODE_STEP_DEG;
  const first = Math.max(0, Math.floor(seen.minDeg / step + 1e-9) * step);
  const last = Math.min(180, Math.ceil(seen.maxDeg / step - 1e-9) * step);
  const nodes: number[] = [];
  for (let a = first; a <= last + 1e-9; a += step) nodes.push(a);
  return nodes;
}
