// Brute force over the whole pupil: the light a flattened drop sends to every point of the sky around the antisolar
// point, by order, from every ray of a square grid over the pupil, each carrying its power × du·dv and binned by where an
// observer sees it: ψ from the antisolar point and arc position α (lib/rays/bow-geometry.ts; α folded onto 0–180°, the
// two halves of the bow being mirror images for an upright drop), over the bin's solid angle (cos ψ₁ − cos ψ₂)·2Δα.
// Power per unit solid angle is the sweeps' power per unit Θ and unit Y (Y = d_out·N ≈ sin Θ·Δα out of the plane, so
// dΘ·dY = dΩ), so the engine's rows at α (sweptSky: each α bin's planes at `planesPerBin` arc positions within it,
// averaged) meet it bin by bin, whatever roots v*(u) the sweeps follow or miss. Used by bench/sky-check.ts and
// test/lib/rays/sky-brute.test.ts.

import { shapedPlaneSweeps, shapedPlaneTracer } from "../lib/bow/shaped-plane-rows.js";
import { planeRayBins } from "../lib/bow/plane-ray-bins.js";
import { bowScatteringPlane } from "../lib/rays/bow-geometry.js";
import type { DropTraceSetup } from "../lib/rays/shape-tracer.js";
import { AT, ORDER_STRIDE } from "../lib/rays/shape-tracer.js";
import { arcFrame, arcPositionInFrame } from "../lib/view/arc-position.js";
import { angleFromAntisolarDeg } from "../lib/view/layer.js";
import { tracedPower } from "./in-plane-brute.js";

const DEG = Math.PI / 180;

export interface SkyGrid {
  psiFromDeg: number;
  psiStepDeg: number;
  psiBins: number;
  alphaFromDeg: number;
  alphaStepDeg: number;
  alphaBins: number;
}

export type DropSetup = Omit<DropTraceSetup, "maxOrder" | "absorptionPerRadius">;

/** Power per unit solid angle of order p on the sky grid, [ψ bin][α bin] flattened ψ-major, brute force over a pupil grid of step du (units of a). */
export function bruteForceSky(setup: DropSetup, sunElevationDeg: number, p: number, sky: SkyGrid, du: number): Float64Array {
  const tracer = shapedPlaneTracer(setup, bowScatteringPlane(sunElevationDeg, 90), { rayOrders: [], bowOrders: [p] });
  // The antisolar direction is the sunlight's own (bow-geometry.ts's frame: x̂ towards the antisolar azimuth, ẑ up).
  const h = sunElevationDeg * DEG;
  const antisolar = [Math.cos(h), 0, -Math.sin(h)];
  const frame = arcFrame(antisolar);
  const out = new Float64Array(sky.psiBins * sky.alphaBins);
  const reach = setup.outline.maxRadius * 1.001;
  const base = p * ORDER_STRIDE;
  for (let u = -reach + du / 2; u < reach; u += du) {
    for (let v = -reach + du / 2; v < reach; v += du) {
      if (u * u + v * v > reach * reach || !tracer.traceAt(u, v, p)) continue;
      const rec = tracer.lastTrace.orders;
      // The observer sees the ray looking back along it: s = −d_out.
      const s = [-rec[base + AT.dir], -rec[base + AT.dir + 1], -rec[base + AT.dir + 2]];
      const i = Math.floor((angleFromAntisolarDeg(s, antisolar) - sky.psiFromDeg) / sky.psiStepDeg);
      const j = Math.floor((arcPositionInFrame(s, frame) - sky.alphaFromDeg) / sky.alphaStepDeg);
      if (i < 0 || i >= sky.psiBins || j < 0 || j >= sky.alphaBins) continue;
      out[i * sky.alphaBins + j] += tracedPower(rec, base) * du * du;
    }
  }
  for (let i = 0; i < sky.psiBins; i++) {
    const psi1 = (sky.psiFromDeg + i * sky.psiStepDeg) * DEG;
    const psi2 = psi1 + sky.psiStepDeg * DEG;
    // Both mirror halves (±α) fall in one bin.
    const solidAngle = (Math.cos(psi1) - Math.cos(psi2)) * 2 * sky.alphaStepDeg * DEG;
    for (let j = 0; j < sky.alphaBins; j++) out[i * sky.alphaBins + j] /= solidAngle;
  }
  return out;
}

/** The service's sweeps of order p (and their branches), ray optics, on the same sky grid: each α bin the mean of planesPerBin planes evenly inside it. */
export function sweptSky(setup: DropSetup, sunElevationDeg: number, p: number, sky: SkyGrid, planesPerBin: number): Float64Array {
  const out = new Float64Array(sky.psiBins * sky.alphaBins);
  // Θ = 180° − ψ, ascending.
  const thetaDeg = Float64Array.from({ length: sky.psiBins }, (_, t) => 180 - (sky.psiFromDeg + (sky.psiBins - 1 - t + 0.5) * sky.psiStepDeg));
  const options = p < 2 ? { rayOrders: [p], bowOrders: [] } : { rayOrders: [], bowOrders: [p] };
  for (let j = 0; j < sky.alphaBins; j++) {
    for (let q = 0; q < planesPerBin; q++) {
      const alphaDeg = sky.alphaFromDeg + (j + (q + 0.5) / planesPerBin) * sky.alphaStepDeg;
      const sweep = shapedPlaneSweeps([setup], bowScatteringPlane(sunElevationDeg, alphaDeg), 1, thetaDeg, sky.psiStepDeg, options)[0][p];
      if (!sweep) continue;
      const bins = planeRayBins(sweep, 1, thetaDeg, sky.psiStepDeg);
      for (const branch of sweep.branches ?? []) planeRayBins(branch, 1, thetaDeg, sky.psiStepDeg, undefined, bins);
      for (let t = 0; t < sky.psiBins; t++) out[(sky.psiBins - 1 - t) * sky.alphaBins + j] += (bins.perpendicular[t] + bins.parallel[t]) / planesPerBin;
    }
  }
  return out;
}
