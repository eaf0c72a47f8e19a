// How far the "airy" engine's colours stray from full Lorenz–Mie for narrow drop-size distributions, after the
// sun-disc convolution: the measurement behind AUTO_AIRY_FROM_RADIUS_UM (lib/bow/engine-choice.ts).
// Both profiles run through the same core steps as the service (water index, radius quadrature, β by
// lib/bow/volume-scattering.ts, limb-darkened sun disc, CIE 1931 2° XYZ). The sun is CIE D65, so the reference white of the CIEDE2000 comparison is the sunlight
// itself, and both XYZ sets are divided by the Mie profile's peak Y: a brightness error counts too.

import { pathToFileURL } from "node:url";
import { makeWavelengthGrid, wavelengthsNm } from "../lib/spectra/grid.js";
import { dropMedium } from "../lib/water/drop-medium.js";
import { radiusQuadrature } from "../lib/drops/quadrature.js";
import { directSunlight } from "../lib/bow/sunlight.js";
import { volumeScattering, type DropEngine } from "../lib/bow/volume-scattering.js";
import { spectraToXyz } from "../lib/colour/tristimulus.js";
import { findBows } from "../lib/bow/bow-peaks.js";
import { SUN_MEAN_ANGULAR_DIAMETER_DEG, convolveProfile, sunDiscKernel } from "../lib/sun/disc.js";
import { deltaE2000 } from "../lib/colour/delta-e.js";

/** Internal angle step: ≥ 10 taps across the sun's disc (0.533°); the uniform Airy bins are exact bin means at any step. */
const INTERNAL_STEP_DEG = 0.05;

export interface EngineComparisonCase {
  drops: { kind: "monodisperse"; radiusUm: number } | { kind: "lognormal"; medianRadiusUm: number; geometricSd: number };
  fromDeg: number;
  toDeg: number;
  stepDeg: number;
  stepNm: number;
  /** Radius nodes per decade; the service's default is 64 (lib/drops/quadrature.ts). */
  nodesPerDecade?: number;
}

export interface EngineComparison {
  anglesDeg: Float64Array;
  deltaE: Float64Array;
  maxDeltaE: number;
  maxAtDeg: number;
  meanDeltaE: number;
  /** ψ of the Mie primary / secondary peaks and ΔE there (null when not found in the window). */
  primary: { deg: number; deltaE: number } | null;
  secondary: { deg: number; deltaE: number } | null;
  mieTermAngles: number;
  mieMs: number;
  airyMs: number;
}

/** Relative XYZ (interleaved, unscaled) of one engine's profile. */
function profileXyz(c: EngineComparisonCase, engine: DropEngine) {
  const grid = makeWavelengthGrid(380, 780, c.stepNm);
  const wl = wavelengthsNm(grid);
  const mRe = new Float64Array(grid.count);
  const mIm = new Float64Array(grid.count);
  const nAir = new Float64Array(grid.count);
  for (let l = 0; l < grid.count; l++) {
    // 15 °C fresh water, the service's default.
    const medium = dropMedium({ temperatureC: 15, salinityPsu: 0 }, wl[l]);
    mRe[l] = medium.mRe;
    mIm[l] = medium.mIm;
    nAir[l] = medium.nAir;
  }
  const quadrature = radiusQuadrature(
    c.drops.kind === "monodisperse"
      ? { kind: "monodisperse", radiusUm: c.drops.radiusUm, totalNumberPerM3: 1000 }
      : { kind: "lognormal", medianRadiusUm: c.drops.medianRadiusUm, geometricSd: c.drops.geometricSd, totalNumberPerM3: 1000 },
    { nodesPerDecade: c.nodesPerDecade },
  );
  const sun = directSunlight({ kind: "cie-d65" }, grid, { elevationDeg: 10, pressureHpa: 1013.25, angstromBeta: 0, angstromAlpha: 0 }, "never");
  const count = Math.round((c.toDeg - c.fromDeg) / c.stepDeg) + 1;
  const refine = Math.round(c.stepDeg / INTERNAL_STEP_DEG);
  const pad = Math.ceil(SUN_MEAN_ANGULAR_DIAMETER_DEG / 2 / INTERNAL_STEP_DEG) + 1;
  const internal = (count - 1) * refine + 1 + 2 * pad;
  const psiHi = c.toDeg + pad * INTERNAL_STEP_DEG;
  // Θ = 180° − ψ ascending; the window must stay clear of the antisolar point (ψ − disc radius > 0).
  const thetaDeg = Float64Array.from({ length: internal }, (_, j) => 180 - psiHi + j * INTERNAL_STEP_DEG);
  const beta = volumeScattering({
    radiiUm: quadrature.radiiUm,
    weightsPerM3: quadrature.weights,
    wavelengthsNm: wl,
    mRe,
    mIm,
    nAir,
    thetaDeg,
    stepDeg: INTERNAL_STEP_DEG,
    engineForRadius: () => engine,
  });
  // Spectral radiance ∝ E_sun·(β⊥ + β∥) smeared by the limb-darkened disc (lib/sun/disc.ts), per wavelength.
  const radiance = new Float64Array(count * grid.count);
  const row = new Float64Array(internal);
  for (let l = 0; l < grid.count; l++) {
    for (let k = 0; k < internal; k++) {
      const j = internal - 1 - k;
      row[k] = beta.perpendicular[l * internal + j] + beta.parallel[l * internal + j];
    }
    const smoothed = convolveProfile(row, sunDiscKernel(SUN_MEAN_ANGULAR_DIAMETER_DEG, INTERNAL_STEP_DEG, wl[l], "neckel-labs-1994"));
    for (let i = 0; i < count; i++) radiance[i * grid.count + l] = sun.irradiance.values[l] * smoothed[pad + i * refine];
  }
  const anglesDeg = Float64Array.from({ length: count }, (_, i) => c.fromDeg + i * c.stepDeg);
  return { anglesDeg, xyz: spectraToXyz(grid, radiance, "cie1931-2"), mieTermAngles: beta.mieTermAngles };
}
export function compareAiryWithMie(c: EngineComparisonCase): EngineComparison {
  const t0 = performance.now();
  const mie = profileXyz(c, "mie");
  const t1 = performance.now();
  const airy = profileXyz(c, "airy");
  const t2 = performance.now();
  let peak = 0;
  for (let i = 1; i < mie.xyz.length; i += 3) peak = Math.max(peak, mie.xyz[i]);
  const deltaE = deltaE2000(mie.xyz.map((v) => v / peak), airy.xyz.map((v) => v / peak));
  const anglesDeg = mie.anglesDeg;
  let maxDeltaE = 0;
  let maxAtDeg = NaN;
  let sum = 0;
  deltaE.forEach((d, i) => {
    sum += d;
    if (d > maxDeltaE) [maxDeltaE, maxAtDeg] = [d, anglesDeg[i]];
  });
  const luminance = Float64Array.from({ length: anglesDeg.length }, (_, i) => mie.xyz[3 * i + 1]);
  const bows = findBows(anglesDeg, luminance);
  const at = (deg: number | null) => (deg === null ? null : { deg, deltaE: deltaE[Math.round((deg - c.fromDeg) / c.stepDeg)] });
  return {
    anglesDeg,
    deltaE,
    maxDeltaE,
    maxAtDeg,
    meanDeltaE: sum / deltaE.length,
    primary: at(bows.primaryDeg),
    secondary: at(bows.secondaryDeg),
    mieTermAngles: mie.mieTermAngles,
    mieMs: t1 - t0,
    airyMs: t2 - t1,
  };
}

export const BENCH_RADII_UM = [20, 40, 60, 100, 150, 250, 500, 1000] as const;

/** Prints the table: per radius and distribution, max and mean ΔE2000 over ψ 30–60° and at both bows. */
export function printAutoEngineTable(
  radiiUm: readonly number[] = BENCH_RADII_UM,
  shapes: readonly string[] = ["mono", "ln1.1", "ln1.2"],
  nodesPerDecade = 384,
  stepNm = 20,
): void {
  console.log(`ψ 30–60° by 0.1° (internal 0.05°), 380–780 nm by ${stepNm} nm, D65 sun, Neckel–Labs disc 0.533°, ${nodesPerDecade} radius nodes/decade`);
  console.log("drops   r/µm  maxΔE  at ψ  meanΔE  ΔE@primary  ΔE@secondary  Mie term-angles  Mie s  Airy s");
  for (const r of radiiUm) {
    for (const shape of shapes) {
      const drops =
        shape === "mono"
          ? ({ kind: "monodisperse", radiusUm: r } as const)
          : ({ kind: "lognormal", medianRadiusUm: r, geometricSd: Number(shape.slice(2)) } as const);
      const res = compareAiryWithMie({ drops, fromDeg: 30, toDeg: 60, stepDeg: 0.1, stepNm, nodesPerDecade });
      const f = (v: number | undefined, d = 2) => (v === undefined ? "–" : v.toFixed(d));
      console.log(
        [
          shape.padEnd(6),
          String(r).padStart(5),
          f(res.maxDeltaE).padStart(5),
          f(res.maxAtDeg, 1).padStart(5),
          f(res.meanDeltaE).padStart(6),
          f(res.primary?.deltaE).padStart(10),
          f(res.secondary?.deltaE).padStart(12),
          res.mieTermAngles.toExponential(2).padStart(15),
          (res.mieMs / 1000).toFixed(1).padStart(5),
          (res.airyMs / 1000).toFixed(1).padStart(6),
        ].join(" "),
      );
    }
  }
}

// node dist/bench/auto-engine.js [radii, comma-separated] [shapes: mono,ln1.1,ln1.2] [nodes per decade]
if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const radii = process.argv[2] ? process.argv[2].split(",").map(Number) : BENCH_RADII_UM;
  const shapes = process.argv[3] ? process.argv[3].split(",") : undefined;
  printAutoEngineTable(radii, shapes, process.argv[4] ? Number(process.argv[4]) : undefined);
}
