// Progress of an answer made of several profiles (the rows of a lookup texture or of a size map): one stage per
// row, planned with the row's estimated cost (profile-work.ts), and filled by the row's own profile meter as its
// work is done, so that a costly row (Lorenz–Mie, large drops, many angles) moves the fraction more than a cheap
// one. Rows whose kernel rows an earlier row computes (rain rates share radius nodes) are weighed without them.

import type { ProfileRequest } from "../../schemas/profile.js";
import { planProfile, PROFILE_STAGES, type ProfileResolution } from "../compute/profile.js";
import { ProgressMeter, type ProgressListener } from "./progress-meter.js";
import { profileWorkNs } from "./profile-work.js";

export interface RowsProgress {
  meter: ProgressMeter;
  /** The meter row j's profile reports to (ProfileDeps.progress); its done() completes the row. */
  part(j: number): ProgressMeter;
  /** Each row's estimated cost, as planned. */
  costsNs: number[];
}

/** rowOf(j): row j's profile request and resolution; threads: the kernel service's parallelism. */
export function rowsProgress(
  count: number,
  rowOf: (j: number) => [ProfileRequest, ProfileResolution],
  threads: number,
  listener: ProgressListener,
): RowsProgress {
  const names = Array.from({ length: count }, (_, j) => `row ${j + 1} of ${count}`);
  const meter = new ProgressMeter(names, listener);
  const seen = new Set<string>();
  const costsNs = names.map((name, j) => {
    const [body, resolution] = rowOf(j);
    const ns = profileWorkNs(body, planProfile(body, resolution), threads, seen);
    meter.plan(name, ns);
    return ns;
  });
  return { meter, part: (j) => meter.part(names[j], PROFILE_STAGES), costsNs };
}
