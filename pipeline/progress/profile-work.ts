// What a profile's work is estimated to cost before it starts (work-costs.ts over its plan): its kernel rows, the sum
// over drops with the sun's disc, and the colour. A profile plans its own progress with it; answers made of several
// profiles (lookup textures, size maps) weigh their rows with it, so that the fraction moves with the work.

import type { ProfileRequest } from "../../schemas/profile.js";
import type { ProfilePlan } from "../compute/profile.js";
import type { DropMedium } from "../../lib/water/drop-medium.js";
import { rowVariant } from "../../lib/bow/cell-average.js";
import { shapedVariant } from "../../lib/bow/shaped-rows.js";
import { COST_NS, kernelRowCostNs } from "./work-costs.js";

/** Size parameter x = 2π·n_air·r / λ of a drop in air (Bohren & Huffman 1983, ch. 4), λ the vacuum wavelength. */
export function sizeParameter(medium: DropMedium, radiusUm: number): number {
  return (2 * Math.PI * medium.nAir * radiusUm * 1000) / medium.wavelengthNm;
}

/** The stages after the kernels: the sum over drops and the disc per wavelength (lattice-profile.ts), and colour. */
export function laterWorkNs(request: ProfileRequest, plan: ProfilePlan): { spectralNsPerWavelength: number; spectralNs: number; colourNs: number } {
  const spanSamples = plan.span.last - plan.span.first + 1;
  const discSamples = Math.ceil(request.sun.discDeg / plan.h) + 1;
  let drops = 0;
  for (const w of plan.quadrature.weights) if (w !== 0) drops++;
  const spectralNsPerWavelength = spanSamples * (drops * COST_NS.sumSample + discSamples * COST_NS.discSample);
  return { spectralNsPerWavelength, spectralNs: plan.grid.count * spectralNsPerWavelength, colourNs: plan.grid.count * plan.count * COST_NS.colourSample };
}

/**
 * The kernel rows' cost in nanoseconds of wall time on `threads` (as the kernel service counts them). seen: rows
 * priced already by an earlier profile of the same answer (its rows share radius nodes), left out here and added.
 */
export function kernelWorkNs(plan: ProfilePlan, threads: number, seen?: Set<string>): number {
  const { media, quadrature, averages, shapePlan, span, h } = plan;
  const samples = span.last - span.first + 1;
  let ns = 0;
  for (const m of media) {
    for (let i = 0; i < quadrature.radiiUm.length; i++) {
      const r = quadrature.radiiUm[i];
      const engine = plan.engine(r);
      if (seen) {
        const key = `${m.wavelengthNm}|${m.mRe}|${m.mIm}|${m.nAir}|${shapedVariant(rowVariant(engine, averages[i]), shapePlan.shapes[i])}|${r}|${h}|${span.first}|${span.last}`;
        if (seen.has(key)) continue;
        seen.add(key);
      }
      ns += kernelRowCostNs(engine, sizeParameter(m, r), samples, averages[i]?.samples ?? 1, shapePlan.shapes[i], media.length);
    }
  }
  return ns / Math.max(1, threads);
}

/** A whole profile's estimated cost (kernels, spectral sum, colour), for weighing it among the rows of an answer. */
export function profileWorkNs(request: ProfileRequest, plan: ProfilePlan, threads: number, seen?: Set<string>): number {
  const later = laterWorkNs(request, plan);
  return kernelWorkNs(plan, threads, seen) + later.spectralNs + later.colourNs;
}
