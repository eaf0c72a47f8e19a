// Which single-drop engine serves which drop radius under method "auto".

import type { DropEngine } from "./volume-scattering.js";
import { mieTermCount } from "../mie/termCount.js";

export type ProfileMethod = "auto" | "mie" | "airy" | "geometric";

/**
 * Drops at or above this radius go to Airy theory (plus ray optics away from the bows) under "auto"; smaller
 * ones to Lorenz–Mie. Set from the measurement in test/auto-engine.test.ts, which compares both engines on
 * rain and fog profiles in ΔE2000.
 */
export const AUTO_AIRY_FROM_RADIUS_UM = 60;

export function engineChooser(method: ProfileMethod): (radiusUm: number) => DropEngine {
  switch (method) {
    case "mie":
      return () => "mie";
    case "airy":
      return () => "airy";
    case "geometric":
      return () => "geometric";
    case "auto":
      return (r) => (r < AUTO_AIRY_FROM_RADIUS_UM ? "mie" : "airy");
  }
}

/** Mie terms × angles a profile would cost: Σ over Mie radii and wavelengths of terms × angles. */
export function estimateMieTermAngles(
  radiiUm: Float64Array,
  wavelengthsNm: Float64Array,
  internalAngles: number,
  engine: (radiusUm: number) => DropEngine,
): number {
  let total = 0;
  for (const r of radiiUm) {
    if (engine(r) !== "mie") continue;
    for (const w of wavelengthsNm) {
      total += mieTermCount((2 * Math.PI * r * 1000) / w) * internalAngles;
    }
  }
  return total;
}
