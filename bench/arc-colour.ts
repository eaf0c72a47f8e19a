// npm run bench:arc-colour: what the arc blend (lib/view/arc-slices.ts, nodes ARC_NODE_STEP_DEG apart) and the kernel
// cache's rounding of sun elevation and arc position (lib/bow/shaped-rows.ts) cost in colour on showers of many drop
// sizes (issue 13): Marshall–Palmer 2 and 25 mm/h with equilibrium shapes, sun 10°, at arc 40–45° (where the bows move
// fastest along the arc). CIEDE2000 per angle (Luo, Cui & Rigg 2001, via colorjs.io) on CIE 1931 XYZ, both scaled by
// the reference profile's peak Y, as bench/shape-colour.ts does.
// - Rounding: a request half a step from the cache's lattice is served the row of the lattice point next to it; for
//   such small steps the spectrum moves in proportion, so the truth there is the mean of the two lattice points'
//   spectra (XYZ is linear in the spectrum: the mean of their XYZ), and the error is that mean against either.
// - Blend: the peak-aligned blend of the profiles at two arc nodes, at the arc position half-way between them, against
//   the profile computed there (and the plain blend beside it, no peak alignment).
// To stay within minutes on a shared 2-core machine: no canting (sharper bows than the default 7.5°: the harder case;
// ARC_COLOUR_CANTING=7.5 for the service's default, the arc-colour-canted section),
// 20 radius nodes per decade (ProfileResolution.nodesPerDecade), 380–780 nm every 20 nm, ψ 30–56° at 0.05°.
// node dist/bench/arc-colour.js [--write]   (--write: the arc-colour section of BENCHMARKS.md)

import { pathToFileURL } from "node:url";
import { loadavg } from "node:os";
import { performance } from "node:perf_hooks";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { xyzDeltaE, xyzOf } from "./auto-presets.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { ArcBlender } from "../lib/view/arc-slices.js";
import type { ProfileColours } from "../lib/view/layer.js";
import { ARC_POSITION_STEP_DEG, SUN_ELEVATION_STEP_DEG } from "../lib/bow/shaped-rows.js";
import { ARC_NODE_STEP_DEG } from "../pipeline/compute/arc-nodes.js";

const SUN_DEG = 10;
const ARC_DEG = 45;
const NODES_PER_DECADE = 20;
const SCENE = {
  spectral: { fromNm: 380, toNm: 780, stepNm: 20 },
  // From 30°: inside the primary, large drops' profiles move fast with the sun's elevation near ψ 35° (measured).
  angles: { fromDeg: 30, toDeg: 56, stepDeg: 0.05 },
  output: { normalise: "physical" },
};
const RATES_MM_PER_H = (process.env.ARC_COLOUR_RATES ?? "2,25").split(",").map(Number);
/** ARC_COLOUR_CANTING=7.5: the drops canted as the service's default (the arc-colour-canted section); 0, the default: none. */
const CANTING_SD_DEG = Number(process.env.ARC_COLOUR_CANTING ?? 0);

export interface ArcColourRow {
  shower: string;
  what: string;
  worst: number;
  at: number;
  mean: number;
}

/** The profile's XYZ per angle as the blender's colours (the blend is linear: XYZ blends as any linear colour). */
function colours(r: ProfileResult, xyz: Float64Array): ProfileColours {
  const a = r.spectral.anglesDeg;
  return { fromDeg: a[0], stepDeg: a[1] - a[0], count: a.length, total: xyz, perpendicular: xyz, parallel: xyz };
}

/** The blend at arc position `alphaDeg` between two nodes' colours, per angle of the grid. */
function blendAt(nodes: [number, number], slices: ProfileColours[], bows: ArcBlender["arc"]["bows"], alphaDeg: number): Float64Array {
  const blender = new ArcBlender({ nodesDeg: Float64Array.from(nodes), slices, bows });
  const grid = slices[0];
  const out = new Float64Array(3 * grid.count);
  const valueAt = (c: ProfileColours, psi: number, ch: number) => {
    const t = (psi - c.fromDeg) / c.stepDeg;
    const i = Math.min(Math.max(Math.floor(t), 0), c.count - 2);
    return c.total[3 * i + ch] * (1 - (t - i)) + c.total[3 * (i + 1) + ch] * (t - i);
  };
  for (let i = 0; i < grid.count; i++) {
    const s = blender.at(alphaDeg, grid.fromDeg + i * grid.stepDeg);
    for (let ch = 0; ch < 3; ch++) out[3 * i + ch] = s.w0 * valueAt(slices[s.k0], s.psi0Deg, ch) + s.w1 * valueAt(slices[s.k1], s.psi1Deg, ch);
  }
  return out;
}

export async function benchArcColour(): Promise<{ rows: ArcColourRow[]; seconds: number }> {
  const pool = createWorkerPool(2);
  const kernels = new KernelService({ memoryBudgetBytes: 2 ** 31, compute: pool.compute, parallelism: 2 });
  const rows: ArcColourRow[] = [];
  const t0 = performance.now();
  try {
    for (const rate of RATES_MM_PER_H) {
      const shower = `Marshall–Palmer ${rate} mm/h`;
      const profile = (arcPositionDeg: number, elevationDeg = SUN_DEG) =>
        computeProfile(
          profileRequestSchema.parse({
            ...SCENE,
            drops: { kind: "marshall-palmer", rainRateMmPerH: rate, shape: { kind: "equilibrium", cantingSdDeg: CANTING_SD_DEG } },
            arcPositionDeg,
            // Sunlight as measured at the ground: its colour does not follow the elevation, so that only the rows do.
            sun: { elevationDeg, spectrum: { kind: "cie-d65" } },
          }),
          { kernels, limits: { maxTermAngles: Infinity } },
          { nodesPerDecade: NODES_PER_DECADE },
        );
      const add = (what: string, ref: Float64Array, test: Float64Array, anglesDeg: Float64Array) => {
        const d = xyzDeltaE(ref, test, anglesDeg);
        rows.push({ shower, what, ...d });
        console.log(`${shower}, ${what}: worst ΔE2000 ${d.worst.toFixed(3)} at ψ ${d.at.toFixed(2)}°, mean ${d.mean.toFixed(4)} (${((performance.now() - t0) / 1000).toFixed(0)} s, load ${loadavg()[0].toFixed(1)})`);
      };
      const base = await profile(ARC_DEG);
      const angles = base.spectral.anglesDeg;
      const xyzBase = xyzOf(base);
      const mean = (a: Float64Array, b: Float64Array) => a.map((v, k) => 0.5 * (v + b[k]));
      const sunStep = xyzOf(await profile(ARC_DEG, SUN_DEG + SUN_ELEVATION_STEP_DEG));
      add(`sun ${SUN_DEG}° rounded from ${SUN_DEG + SUN_ELEVATION_STEP_DEG / 2}° (half a ${SUN_ELEVATION_STEP_DEG}° step)`, mean(xyzBase, sunStep), xyzBase, angles);
      const arcStep = xyzOf(await profile(ARC_DEG + ARC_POSITION_STEP_DEG));
      add(`arc ${ARC_DEG}° rounded from ${ARC_DEG + ARC_POSITION_STEP_DEG / 2}° (half a ${ARC_POSITION_STEP_DEG}° step)`, mean(xyzBase, arcStep), xyzBase, angles);
      // The views' node spacing and half of it, nodes either side of the same arc position.
      const mid = ARC_DEG - ARC_NODE_STEP_DEG / 2;
      const truth = xyzOf(await profile(mid));
      for (const spacing of [ARC_NODE_STEP_DEG, ARC_NODE_STEP_DEG / 2]) {
        const nodes: [number, number] = [mid - spacing / 2, mid + spacing / 2];
        const ends = [nodes[0] === ARC_DEG ? base : await profile(nodes[0]), nodes[1] === ARC_DEG ? base : await profile(nodes[1])];
        const slices = ends.map((r) => colours(r, xyzOf(r)));
        const what = `blend of arc ${nodes[0]}° and ${nodes[1]}° (${spacing}° apart) at ${mid}°`;
        add(`${what}, peaks aligned (as views draw)`, truth, blendAt(nodes, slices, [ends[0].bows, ends[1].bows], mid), angles);
        const none = { primaryDeg: null, secondaryDeg: null };
        add(`${what}, plain`, truth, blendAt(nodes, slices, [none, none], mid), angles);
      }
    }
  } finally {
    await pool.close();
  }
  return { rows, seconds: (performance.now() - t0) / 1000 };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const load = loadavg()[0];
  const { rows, seconds } = await benchArcColour();
  if (process.argv.includes("--write")) {
    const canted = CANTING_SD_DEG > 0;
    writeMarkedSection(canted ? "arc-colour-canted" : "arc-colour", [
      `## Flattened drops: the arc blend and the cache's rounding on whole showers, in colour${canted ? ` (canting ${CANTING_SD_DEG}°)` : ""}`,
      "",
      `Written by \`${canted ? `ARC_COLOUR_CANTING=${CANTING_SD_DEG} ` : ""}npm run bench:arc-colour\` (bench/arc-colour.ts), ${benchDate()}; ${machineLine()}; 2 worker threads; one-minute`,
      `load average ${load.toFixed(1)} at the start, ${loadavg()[0].toFixed(1)} at the end; ${seconds.toFixed(0)} s in all. Equilibrium shapes ${canted ? `canted by ${CANTING_SD_DEG}° (the service's default)` : "without canting (sharper bows than the default 7.5°)"},`,
      `${NODES_PER_DECADE} radius nodes per decade, 380–780 nm every 20 nm, ψ ${SCENE.angles.fromDeg}–${SCENE.angles.toDeg}° at ${SCENE.angles.stepDeg}°, sun ${SUN_DEG}° with CIE D65 light (a spectrum at the ground, whose colour does not follow the elevation: only the rows do). CIEDE2000 per`,
      "angle on XYZ scaled by the reference's peak Y. Rounding rows: a request half a step away is served the lattice point's",
      "rows; the truth there is taken as the mean of the two neighbouring lattice points' spectra. Blend rows: the views' blend",
      `of two arc nodes ${ARC_NODE_STEP_DEG}° apart (the views' spacing) and half that, half-way between them, against the profile computed there.`,
      "",
      "| shower | comparison | worst ΔE2000 | at ψ (°) | mean ΔE2000 |",
      "|---|---|---|---|---|",
      ...rows.map((r) => `| ${r.shower} | ${r.what} | ${r.worst.toFixed(3)} | ${r.at.toFixed(2)} | ${r.mean.toFixed(4)} |`),
    ]);
  }
}
