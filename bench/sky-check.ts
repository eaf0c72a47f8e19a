// node dist/bench/sky-check.js [--write]: the service's flattened-drop sweeps against brute force over the whole pupil
// (bench/sky-brute.ts), on the sky around the antisolar point: upright equilibrium drops of several sizes and suns,
// n 1.3338, ray optics of the reflection (order 0) and the primary's and secondary's orders (2, 3), ψ 10–60° in 1° bins,
// arc position 0–180° in 5° bins (8 planes a bin). Per case: the largest difference in any bin and order, as a
// fraction of the brute force's brightest bin (all orders), and where. An accuracy check for issue 13, not a timing.

import { benchDate, machineLine, writeMarkedSection } from "./sections.js";
import { bruteForceSky, sweptSky, type SkyGrid } from "./sky-brute.js";
import { equilibriumOutline } from "../lib/drops/shape/equilibrium-shape.js";
import { cantedAxis } from "../lib/rays/bow-geometry.js";

const N = 1.3338;
const ORDERS = [0, 2, 3];
const SKY: SkyGrid = { psiFromDeg: 10, psiStepDeg: 1, psiBins: 50, alphaFromDeg: 0, alphaStepDeg: 5, alphaBins: 36 };
/** Pupil step of the brute force (units of a): ~10⁶ rays a case. */
const DU = 0.002;
const PLANES_PER_BIN = 8;
const CASES = [
  { radiusUm: 1000, sunDeg: 10 },
  { radiusUm: 1500, sunDeg: 10 },
  { radiusUm: 1500, sunDeg: 30 },
  { radiusUm: 2000, sunDeg: 10 },
  { radiusUm: 2500, sunDeg: 5 },
];

const rows: string[] = [];
for (const { radiusUm, sunDeg } of CASES) {
  const setup = { outline: equilibriumOutline(radiusUm), axis: cantedAxis(0, 0), n: N };
  const brute = ORDERS.map((p) => bruteForceSky(setup, sunDeg, p, SKY, DU));
  const swept = ORDERS.map((p) => sweptSky(setup, sunDeg, p, SKY, PLANES_PER_BIN));
  let peak = 0;
  for (let b = 0; b < SKY.psiBins * SKY.alphaBins; b++) peak = Math.max(peak, brute.reduce((sum, orderBins) => sum + orderBins[b], 0));
  let worst = { miss: 0, order: 0, psi: 0, alpha: 0, brute: 0, swept: 0 };
  const worstByOrder = ORDERS.map(() => 0);
  ORDERS.forEach((p, k) => {
    for (let b = 0; b < brute[k].length; b++) {
      const miss = Math.abs(swept[k][b] - brute[k][b]) / peak;
      worstByOrder[k] = Math.max(worstByOrder[k], miss);
      if (miss > worst.miss) {
        const i = Math.floor(b / SKY.alphaBins);
        const j = b % SKY.alphaBins;
        worst = { miss, order: p, psi: SKY.psiFromDeg + (i + 0.5) * SKY.psiStepDeg, alpha: SKY.alphaFromDeg + (j + 0.5) * SKY.alphaStepDeg, brute: brute[k][b] / peak, swept: swept[k][b] / peak };
      }
    }
  });
  const row = `| ${radiusUm / 1000} mm, sun ${sunDeg}° | ${worstByOrder.map((m) => m.toFixed(3)).join(" / ")} | order ${worst.order} at ψ ${worst.psi}°, α ${worst.alpha}°: brute ${worst.brute.toFixed(3)}, sweeps ${worst.swept.toFixed(3)} |`;
  console.log(row);
  rows.push(row);
}

if (process.argv.includes("--write")) {
  writeMarkedSection(
    "sky-check",
    [
      "## Flattened drops: the sweeps against brute force over the whole pupil, on the sky",
      "",
      `Written by \`node dist/bench/sky-check.js --write\` (bench/sky-check.ts), ${benchDate()}; ${machineLine()}. Upright equilibrium`,
      `drops, n ${N}, ray optics. Brute force: every ray of a ${DU} a pupil grid binned by where it is seen (bench/sky-brute.ts); sweeps: the`,
      `service's planes (${PLANES_PER_BIN} a bin) and their branches. ψ ${SKY.psiFromDeg}–${SKY.psiFromDeg + SKY.psiBins * SKY.psiStepDeg}° in ${SKY.psiStepDeg}° bins, arc position 0–180° in ${SKY.alphaStepDeg}° bins. Largest`,
      "difference in one bin, as a fraction of the brute force's brightest bin (all orders).",
      "",
      "| drops | worst: order 0 / 2 / 3 | where |",
      "|---|---|---|",
      ...rows,
    ],
  );
}
