// Progress of an answer made of several profiles (the rows of a lookup texture or of a size map): one stage per
// row, planned with the row's estimated cost (profile-work.ts), and filled by the row's own profile meter as its
// work is done, so that a costly row (Lorenz–Mie, large drops, many angles) moves the fraction more than a cheap
// one. Rows whose kernel rows an earlier row computes (rain rates share radius nodes) are weighed without them.

import type { ProfileRequest } from "../../schemas/profile.js";
import { planProfile, PROFILE_STAGES, type ProfilePlan, type ProfileResolution } from "../compute/profile.js";
import { ProgressMeter, type ProgressListener } from "./progress-meter.js";
import { profileWorkNs } from "./profile-work.js";

export interface RowsProgress {
  meter: ProgressMeter;
  /** The meter row j's profile reports to (ProfileDeps.progress); its done() completes the row. */
  part(j: number): ProgressMeter;
  /** Each row's estimated cost, as planned. */
  costsNs: number[];
  /** Each row's profile plan (planProfile), for computeProfile not to make it again. */
  plans: ProfilePlan[];
}

/** The stage names of rows in a texture or size map: "row 1 of 24", … */
export function rowNames(count: number): string[] {
  return Array.from({ length: count }, (_, j) => `row ${j + 1} of ${count}`);
}

/**
 * names: one stage per row; rowOf(j): row j's profile request and resolution; threads: the kernel service's
 * parallelism; into: the listener of a meter made here, or a stage of a meter that the rows fill together (the
 * profiles a view takes along the arc fill its "kernels" stage).
 */
export function rowsProgress(
  names: readonly string[],
  rowOf: (j: number) => [ProfileRequest, ProfileResolution],
  threads: number,
  into: ProgressListener | { meter: ProgressMeter; stage: string },
): RowsProgress {
  const plans = names.map((_, j) => planProfile(...rowOf(j)));
  const seen = new Set<string>();
  const costsNs = names.map((_, j) => profileWorkNs(rowOf(j)[0], plans[j], threads, seen));
  let meter: ProgressMeter;
  if (typeof into === "function") meter = new ProgressMeter(names, into);
  else {
    into.meter.plan(into.stage, costsNs.reduce((a, b) => a + b, 0));
    meter = into.meter.part(into.stage, names);
  }
  names.forEach((name, j) => meter.plan(name, costsNs[j]));
  return { meter, part: (j) => meter.part(names[j], PROFILE_STAGES), costsNs, plans };
}
