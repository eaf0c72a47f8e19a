import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile } from "../server/profile-service.js";
import { timeIt } from "./timing.js";

export interface ProfileBenchRow {
  name: string;
  medianMs: number;
  runs: number;
  mieTermAngles: number;
}

const workloads: { name: string; body: unknown }[] = [
  { name: "default profile `{}` (Marshall–Palmer 2 mm/h, auto)", body: {} },
  {
    name: "fog, lognormal 10 µm, full Mie, ψ 20–60° step 0.2°",
    body: { drops: { kind: "lognormal", medianRadiusUm: 10, geometricSd: 1.4, totalNumberPerM3: 1e8 }, method: "mie", angles: { fromDeg: 20, toDeg: 60, stepDeg: 0.2 } },
  },
  { name: "heavy rain 25 mm/h, airy engine", body: { drops: { kind: "marshall-palmer", rainRateMmPerH: 25 }, method: "airy" } },
];

/** Whole profiles as the service computes them (no cache yet: every run is cold). */
export function benchProfiles(): ProfileBenchRow[] {
  return workloads.map(({ name, body }) => {
    const request = profileRequestSchema.parse(body);
    let mieTermAngles = 0;
    const t = timeIt(
      () => {
        const r = computeProfile(request, { maxTermAngles: Infinity });
        mieTermAngles = r.spectral.mieTermAngles;
        return r.colour.luminance[0];
      },
      { warmup: 1, runs: 3 },
    );
    return { name, medianMs: t.medianMs, runs: t.runs, mieTermAngles };
  });
}
