// What the flattened-drop engine's shortcuts cost in colour (issue 13), as CIEDE2000 (Luo, Cui & Rigg 2001, via
// colorjs.io) per sample on CIE 1931 XYZ, both profiles scaled by the reference profile's peak Y (as
// bench/auto-presets.ts does), over ψ 30–60°:
// - the flattening threshold: drops of one size as spheres against their equilibrium shape, at the top of the bow
//   (arc position 0°, where flattening moves the bow most; sun 10°, canting 7.5°). Below FLATTENED_FROM_RADIUS_UM the
//   service draws "equilibrium" drops as spheres, so there the shape is a spheroid of the equilibrium axis ratio.
//   The sphere goes through the same engine (a spheroid of axis ratio 1, which reproduces the sphere engine's
//   Airy/ray rows: test/lib/rays/shaped-drops.test.ts), so the figure is the shape's effect, not the engines'.
// - the cache's rounding steps: profiles one step apart in sun elevation (0.25°) and in arc position (0.5°), at
//   arc 45° (where the fold angles move fastest with arc position) for 1 mm drops. A request is rounded by at most half
//   a step, and for such small steps the colour changes in proportion, so the rounding costs about half the figure.
// node dist/bench/shape-colour.js [--write]   (--write: the shape-colour section of BENCHMARKS.md)

import { pathToFileURL } from "node:url";
import { loadavg } from "node:os";
import { performance } from "node:perf_hooks";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { xyzDeltaE, xyzOf } from "./auto-presets.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { outlineAxisRatio } from "../lib/drops/shape/outline.js";
import { ARC_POSITION_STEP_DEG, FLATTENED_FROM_RADIUS_UM, SUN_ELEVATION_STEP_DEG } from "../lib/bow/shaped-rows.js";

/** Every 20 nm: the colours of a bow need no finer spectrum for a difference (the default is 10 nm). */
const SPECTRAL = { fromNm: 380, toNm: 780, stepNm: 20 };
const RADII_UM = [100, 150, 250, 500];

export interface ShapeColourRow {
  what: string;
  worstDeltaE: number;
  worstAtDeg: number;
  meanDeltaE: number;
  seconds: number;
}

function compare(reference: ProfileResult, other: ProfileResult): { worst: number; at: number; mean: number } {
  return xyzDeltaE(xyzOf(reference), xyzOf(other), reference.spectral.anglesDeg);
}

export async function benchShapeColour(workers = 2): Promise<ShapeColourRow[]> {
  const pool = createWorkerPool(workers);
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute });
  const opts = { kernels, limits: { maxTermAngles: Infinity } };
  const profile = (body: Record<string, unknown>) => computeProfile(profileRequestSchema.parse({ spectral: SPECTRAL, sun: { elevationDeg: 10 }, ...body }), opts);
  const rows: ShapeColourRow[] = [];
  const add = async (what: string, reference: Record<string, unknown>, other: Record<string, unknown>) => {
    const t0 = performance.now();
    const d = compare(await profile(reference), await profile(other));
    rows.push({ what, worstDeltaE: d.worst, worstAtDeg: d.at, meanDeltaE: d.mean, seconds: (performance.now() - t0) / 1000 });
    console.log(`${what}: worst ΔE2000 ${d.worst.toFixed(2)} at ψ ${d.at.toFixed(2)}°, mean ${d.mean.toFixed(3)} (${rows.at(-1)!.seconds.toFixed(0)} s, load ${loadavg()[0].toFixed(1)})`);
  };
  try {
    for (const radiusUm of RADII_UM) {
      const drops = { kind: "monodisperse", radiusUm, numberPerM3: 1000 };
      const axisRatio = Number(outlineAxisRatio(equilibriumOutline(radiusUm)).toFixed(6));
      const shape = radiusUm >= FLATTENED_FROM_RADIUS_UM ? { kind: "equilibrium" } : { kind: "spheroid", axisRatio };
      await add(
        `${radiusUm} µm: sphere vs ${shape.kind === "equilibrium" ? "equilibrium shape" : `spheroid of the equilibrium axis ratio`} (${axisRatio.toFixed(4)}), top of the bow`,
        { drops: { ...drops, shape }, arcPositionDeg: 0 },
        // Canting turns a sphere into itself: none is traced.
        { drops: { ...drops, shape: { kind: "spheroid", axisRatio: 1, cantingSdDeg: 0 } }, arcPositionDeg: 0 },
      );
    }
    const rain = { drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium" } } };
    await add(`1000 µm, arc 45°: sun 10° vs ${10 + SUN_ELEVATION_STEP_DEG}° (one step)`, { ...rain, arcPositionDeg: 45 }, { ...rain, arcPositionDeg: 45, sun: { elevationDeg: 10 + SUN_ELEVATION_STEP_DEG } });
    await add(`1000 µm, sun 10°: arc 45° vs ${45 + ARC_POSITION_STEP_DEG}° (one step)`, { ...rain, arcPositionDeg: 45 }, { ...rain, arcPositionDeg: 45 + ARC_POSITION_STEP_DEG });
  } finally {
    await pool.close();
  }
  return rows;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const load = loadavg()[0];
  const rows = await benchShapeColour();
  if (process.argv.includes("--write")) {
    writeMarkedSection("shape-colour", [
      "## Flattened drops: what the threshold and the cache's rounding cost in colour",
      "",
      `Written by \`node dist/bench/shape-colour.js --write\` (bench/shape-colour.ts), ${benchDate()}; ${machineLine()};`,
      `one-minute load average ${load.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end. CIEDE2000 per sample over ψ 30–60° (step 0.1°),`,
      "XYZ of both profiles scaled by the first profile's peak Y; 380–780 nm every 20 nm, sun 10°, canting 7.5°, monodisperse.",
      `Threshold rows: the service draws "equilibrium" drops below ${FLATTENED_FROM_RADIUS_UM} µm as spheres; the row shows what that leaves out.`,
      "Rounding rows: one full step apart; a request moves by at most half a step, so its error is about half the figure.",
      "Reading: per-sample ΔE2000 of one drop size is ruled by the bow's sharp outer edge, where a shift of 0.012° (the 100 µm",
      "row's fold shift) already gives 2.4; neither the threshold nor the steps keep it below 0.5 for single sizes.",
      "",
      "| comparison | worst ΔE2000 | at ψ (°) | mean ΔE2000 | time (s) |",
      "|---|---|---|---|---|",
      ...rows.map((r) => `| ${r.what} | ${r.worstDeltaE.toFixed(2)} | ${r.worstAtDeg.toFixed(2)} | ${r.meanDeltaE.toFixed(3)} | ${r.seconds.toFixed(0)} |`),
    ]);
  }
}
