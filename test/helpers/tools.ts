// Tests that need a program outside Node (OpenEXR's tools, ImageMagick, redis-server, Chromium). Where one is
// missing they are marked skipped, so the run shows them as skipped instead of passing them; CI (CI=true) installs
// every such program (.ci/run), so there they always run, and a missing program fails them.
import { spawnSync } from "node:child_process";

export const IN_CI = process.env.CI === "true";

/** The condition for `it.skipIf`: the program is missing here and this is not CI. */
export function skipWithout(present: boolean): boolean {
  return !present && !IN_CI;
}

/** Whether the program can be started (it is on PATH); its exit status is not looked at. */
export function programRuns(name: string, args: readonly string[]): boolean {
  return spawnSync(name, args, { encoding: "utf8" }).error === undefined;
}
