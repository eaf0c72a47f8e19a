// npm run bench:canting-splat [-- --write]: the canting mean by rotation over the upright drop's pupil
// (lib/bow/canting-rotation.ts, the service's for canted drops above 1 mm) at its own grid, at finer pupil grids and at
// elevations twice as far apart, against brute force over the pupil (bench/canting-pupil.ts: pupil step 0.005, elevations
// 0.5° apart, point bins; bench/canting-setup.ts) and beside the canting rules (lib/bow/shaped-rows.ts: the five-node
// rule, or the banded one near the top or foot of the bow), all in one process: errors as bench/canting-spread.ts gives them (one wavelength, 550 nm, n 1.3345 — the
// rotation's rays interpolated to it from its index nodes —, after the sun's disc, ψ 30–58°: worst share of the
// reference's peak / summed |Δ| over the summed reference) and the CPU time of each at that one wavelength. Writes the
// canting-splat section of BENCHMARKS.md with --write.

import { loadavg } from "node:os";
import { shapedRows, type ShapedRowSpec } from "../lib/bow/shaped-rows.js";
import { rotationCantingRows, ROTATION_ELEVATIONS_PER_SD, ROTATION_PUPIL_STEP } from "../lib/bow/canting-rotation.js";
import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { WATER_INDEX_RANGE } from "../lib/water/index-range.js";
import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { errors, N_RE, PUPIL_GRID, pupilReference, SD_DEG, seen, sizeParameter, STEP_DEG, SUN_DEG, THETA_DEG, WAVELENGTH_UM } from "./canting-setup.js";
import { cpuTimed } from "./timing.js";

/** The service's grid first, then finer pupils, and elevations twice as far apart. */
const GRIDS: { pupilStep: number; elevationsPerSd: number; growthCap?: number }[] = [
  { pupilStep: ROTATION_PUPIL_STEP, elevationsPerSd: ROTATION_ELEVATIONS_PER_SD },
  { pupilStep: 0.02, elevationsPerSd: ROTATION_ELEVATIONS_PER_SD, growthCap: 1 },
  { pupilStep: 0.014, elevationsPerSd: ROTATION_ELEVATIONS_PER_SD, growthCap: 1 },
  { pupilStep: 0.01, elevationsPerSd: ROTATION_ELEVATIONS_PER_SD, growthCap: 1 },
  { pupilStep: ROTATION_PUPIL_STEP, elevationsPerSd: ROTATION_ELEVATIONS_PER_SD / 2 },
];
/** A grid's column head: its step at the tilts' mode, and whether it grows away from it (rotationPupilStep). */
const gridName = (g: (typeof GRIDS)[number]) => `pupil step ${g.pupilStep}${g.growthCap === 1 ? " everywhere" : " at the mode, growing"}, ${g.elevationsPerSd} elevations per σ`;
const CASES: { radiusUm: number; arcPositionDeg: number }[] = process.env.CASES
  ? JSON.parse(process.env.CASES)
  : [
      { radiusUm: 1000, arcPositionDeg: 0 },
      { radiusUm: 1000, arcPositionDeg: 90 },
      { radiusUm: 1500, arcPositionDeg: 0 },
      { radiusUm: 1500, arcPositionDeg: 90 },
      { radiusUm: 2000, arcPositionDeg: 0 },
      { radiusUm: 2000, arcPositionDeg: 10 },
      { radiusUm: 2000, arcPositionDeg: 90 },
      { radiusUm: 2500, arcPositionDeg: 45 },
    ];

const figure = (row: Float64Array, reference: Float64Array, ms: number) => {
  const { worst, summed } = errors(row, reference);
  return `${worst.toFixed(3)} / ${summed.toFixed(3)} (${(ms / 1000).toFixed(1)} s)`;
};

const lines: string[] = [];
for (const { radiusUm, arcPositionDeg } of CASES) {
  const x = sizeParameter(radiusUm);
  const outline = equilibriumOutline(radiusUm);
  const reference = pupilReference(radiusUm, arcPositionDeg);
  const place = { sunElevationDeg: SUN_DEG, cantingSdDeg: SD_DEG, arcPositionDeg };
  const rule: ShapedRowSpec = { kind: "equilibrium", ...place, rayOnly: false, traceEveryIndex: true, cantingBand: radiusUm > 1000 };
  const rules = cpuTimed(() => shapedRows(rule, [{ radiusUm, mRe: N_RE, x }], THETA_DEG, STEP_DEG, "spread")[0]);
  const rotations = GRIDS.map((grid) =>
    cpuTimed(() => rotationCantingRows({ outline, ...place, indexSpan: WATER_INDEX_RANGE, grid, rayOnly: true }, [{ mRe: N_RE, x }], THETA_DEG, STEP_DEG)[0]),
  );
  const line =
    `| ${radiusUm / 1000} mm, arc ${arcPositionDeg}° | ${figure(seen(rules.value.perp, rules.value.par), reference, rules.ms)} | ` +
    rotations.map((r) => figure(seen(r.value.perp, r.value.par), reference, r.ms)).join(" | ") +
    " |";
  console.log(line);
  lines.push(line);
}

const section = [
  "## Flattened drops: the canting mean by rotation over the upright drop's pupil",
  "",
  `Written by \`npm run bench:canting-splat -- --write\` (bench/canting-splat.ts), ${benchDate()}; ${machineLine()}; one thread; load average ${loadavg()[0].toFixed(1)} at the end.`,
  `Equilibrium drops, canting σ ${SD_DEG}°, sun ${SUN_DEG}°, ${WAVELENGTH_UM * 1000} nm (n ${N_RE}), after the sun's disc, ψ 30–58°. Each cell: against brute force over the`,
  `pupil (bench/canting-pupil.ts: pupil step ${PUPIL_GRID.du}, elevations ${PUPIL_GRID.elevationStepDeg}° apart over ±${PUPIL_GRID.spanSd}σ, each ray binned as a point), the worst share of its peak /`,
  "the summed |Δ| over its sum, and (CPU time at this one wavelength, one process, one after another). Rules: the canting rules",
  "(lib/bow/plane-canting-nodes.ts: five tilts, above 1 mm at the top or foot the banded rule; each node's bow spread over",
  "its cell), traced at this index. Rotation (lib/bow/canting-rotation.ts): for each relative sun elevation every ray of a",
  "square grid over one half of the upright drop's pupil (by its mirror plane through the sunlight; each ray stands for",
  "its mirror) traced at 4 refractive indices (interpolated to this one), weighed by the tilts' density at the arc",
  "position it leaves at, each pupil cell spread over Θ as two triangles; each elevation's grid turned by the golden angle",
  "and shifted; \"growing\": the pupil step at an elevation z·σ from the tilts' mode is the mode's times e^{z²/8}, at most",
  "twice it (rotationPupilStep). At 41 wavelengths (380–780 nm) the times grow unlike: on 2 mm drops at the side",
  "(2026-12-05 07:25 UTC, one thread, issue 13's notes) the service's grid took 1.50 s at one wavelength and 3.17 s at 41",
  "(each wavelength's rays interpolated and spread; pupil step 0.02 everywhere 2.03–2.44 s and 4.05–4.26 s in the same",
  "process), the rules 0.13 s and 8.6 s (each wavelength's rows from planes at 7 indices; 2026-12-05 03:25 UTC).",
  "",
  `| drops, place on the bow | rules | ${GRIDS.map((g, k) => `rotation, ${gridName(g)}${k === 0 ? " (the service's)" : k === 1 ? " (engine 22's)" : ""}`).join(" | ")} |`,
  `|---|---|${GRIDS.map(() => "---|").join("")}`,
  ...lines,
];
if (process.argv.includes("--write")) writeMarkedSection("canting-splat", section);
else console.log(section.join("\n"));
