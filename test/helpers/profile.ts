import { profileRequestSchema } from "../../schemas/profile.js";
import { computeProfile, type ProfileResolution, type ProfileResult } from "../../pipeline/compute/profile.js";
import { KernelService } from "../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../pipeline/kernels/worker-pool.js";

/** One in-memory kernel cache for the test process: later profiles reuse the kernels of earlier ones. */
const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });

/** Runs a profile from a partial request body without any cost limit. */
export function profileOf(body: unknown, resolution: ProfileResolution = {}): Promise<ProfileResult> {
  return computeProfile(profileRequestSchema.parse(body), { kernels, limits: { maxTermAngles: Infinity } }, resolution);
}

export function meanOver(anglesDeg: Float64Array, values: Float64Array, fromDeg: number, toDeg: number): number {
  let sum = 0;
  let count = 0;
  for (let i = 0; i < anglesDeg.length; i++) {
    if (anglesDeg[i] >= fromDeg && anglesDeg[i] <= toDeg) {
      sum += values[i];
      count++;
    }
  }
  return sum / count;
}

/** ψ of the largest spectral radiance at wavelength index l within a window. */
export function spectralPeakDeg(result: ProfileResult, wavelengthNm: number, fromDeg: number, toDeg: number): number {
  const l = Math.round((wavelengthNm - result.grid.fromNm) / result.grid.stepNm);
  const { anglesDeg, perpendicular, parallel } = result.spectral;
  const nl = result.grid.count;
  let best = -1;
  let bestValue = -Infinity;
  for (let i = 0; i < anglesDeg.length; i++) {
    if (anglesDeg[i] < fromDeg || anglesDeg[i] > toDeg) continue;
    const v = perpendicular[i * nl + l] + parallel[i * nl + l];
    if (v > bestValue) {
      bestValue = v;
      best = i;
    }
  }
  return anglesDeg[best];
}
