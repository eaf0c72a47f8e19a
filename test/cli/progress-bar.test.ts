// The CLI's progress bar: in a terminal (a pseudo-terminal made by util-linux's `script`) a render shows many
// percentages with the stage and the time left; through a pipe it shows nothing.
import { describe, it, expect } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { barLine, timeLeftText } from "../../cli/progress-bar.js";
import { programRuns, skipWithout } from "../helpers/tools.js";

const cli = fileURLToPath(new URL("../../dist/cli/antisolar.js", import.meta.url));
// Lorenz–Mie for every drop at 61 wavelengths, 1,024 sizes per decade: 61 kernel tasks, about 3 s on one thread
// (measured 2026-12-03), so that the kernels stage outlasts the half second before a time left is shown. These small
// drops' rows are computed on sub-lattices (lib/bow/mie-sub-lattice.ts): the earlier 31 wavelengths over ψ 36–46° at
// auto density took under half a second and showed no time left.
const REQUEST = {
  drops: { kind: "lognormal", medianRadiusUm: 30, geometricSd: 1.2, totalNumberPerM3: 1e6 },
  method: "mie",
  angles: { fromDeg: 30, toDeg: 60, stepDeg: 0.2 },
  spectral: { fromNm: 400, toNm: 700, stepNm: 5 },
  mieSizesPerDecade: 1024,
};

describe("the CLI's progress bar", () => {
  it("draws the fraction, the stage and the time left", () => {
    expect(barLine("rendering", { fraction: 0.5, stage: "kernels", secondsLeft: 12.4 })).toBe(
      "rendering [###############...............]  50 % kernels      about 12 s left",
    );
    expect(timeLeftText(185)).toBe("about 3 min 5 s left");
    expect(timeLeftText(0.3)).toBe("under a second left");
    expect(timeLeftText(null)).toBe("");
  });

  it.skipIf(skipWithout(programRuns("script", ["--version"])))("prints at least ten distinct percentages in a terminal, and none through a pipe", () => {
    const dir = mkdtempSync(join(tmpdir(), "antisolar-cli-bar-"));
    try {
      const request = join(dir, "profile.json");
      writeFileSync(request, JSON.stringify(REQUEST));
      const env = { ...process.env, CACHE_DIR: "", WORKERS: "1" };
      const command = [process.execPath, cli, "render", request, "-o", join(dir, "bow.json")].map((a) => `'${a}'`).join(" ");
      // script -q (no banner) -e (its exit status is the command's) -f (flush as written) -c command; typescript to /dev/null.
      const tty = spawnSync("script", ["-qefc", command, "/dev/null"], { encoding: "utf8", env, timeout: 300_000 });
      expect(tty.status, tty.stdout + tty.stderr).toBe(0);
      const percentages = [...tty.stdout.matchAll(/\] +(\d+) % (\S+)/g)].map((m) => Number(m[1]));
      for (let k = 1; k < percentages.length; k++) expect(percentages[k]).toBeGreaterThanOrEqual(percentages[k - 1]);
      expect(new Set(percentages).size).toBeGreaterThanOrEqual(10);
      expect(percentages.at(-1)).toBe(100);
      expect(tty.stdout).toMatch(/% kernels +(about \d+ (min \d+ )?s|under a second) left/);
      expect(tty.stdout).toContain("wrote ");

      const piped = spawnSync(process.execPath, [cli, "render", request, "-o", join(dir, "again.json")], { encoding: "utf8", env });
      expect(piped.status).toBe(0);
      expect(piped.stderr).not.toContain("%");
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 300_000);
});
