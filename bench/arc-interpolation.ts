// npm run bench:arc: how well the peak-aligned blend between arc nodes (lib/view/arc-slices.ts) stands in for a
// profile computed at the arc position half-way between them. 2 mm drops (equilibrium shapes, canting 7.5°), sun
// 10° up, two wavelengths about 550 nm (sharp bows: the hardest case; a full spectrum and a spread of sizes smooth
// them). Prints, per pair of nodes: the blend's summed |ΔY| over the summed Y (L1) and its largest |ΔY| over the
// peak, aligned and plain. Accuracy, not speed: the figures go to pipeline/compute/arc-nodes.ts and docs/views.md.
import { profileRequestSchema } from "../schemas/profile.js";
import { computeProfile, type ProfileResult } from "../pipeline/compute/profile.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createWorkerPool } from "../pipeline/kernels/worker-pool.js";
import { ArcBlender } from "../lib/view/arc-slices.js";
import type { ProfileColours } from "../lib/view/layer.js";

const pool = createWorkerPool(2);
const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: pool.compute });
const SCENE = {
  drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium" } },
  spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
  angles: { fromDeg: 30, toDeg: 56, stepDeg: 0.05 },
  sun: { elevationDeg: 10 },
  output: { normalise: "physical" },
};
const PAIRS = (process.env.ARC_PAIRS ?? "0,5;0,10;40,45;40,50;80,85;80,90").split(";").map((p) => p.split(",").map(Number));

const profileAt = (arcPositionDeg: number) => computeProfile(profileRequestSchema.parse({ ...SCENE, arcPositionDeg }), { kernels, limits: { maxTermAngles: Infinity } });

/** The profile's luminance as grey colours, for the blender. */
function grey(r: ProfileResult): ProfileColours {
  const y = r.colour.luminanceCdPerM2;
  const total = new Float64Array(3 * y.length);
  y.forEach((v, i) => total.fill(v, 3 * i, 3 * i + 3));
  const a = r.spectral.anglesDeg;
  return { fromDeg: a[0], stepDeg: a[1] - a[0], count: y.length, total, perpendicular: total, parallel: total };
}

function valueAt(c: ProfileColours, psi: number): number {
  const t = (psi - c.fromDeg) / c.stepDeg;
  const i = Math.min(Math.max(Math.floor(t), 0), c.count - 2);
  return c.total[3 * i] * (1 - (t - i)) + c.total[3 * (i + 1)] * (t - i);
}

for (const [a0, a1] of PAIRS) {
  const mid = (a0 + a1) / 2;
  const [p0, pm, p1] = [await profileAt(a0), await profileAt(mid), await profileAt(a1)];
  const slices = [grey(p0), grey(p1)];
  const truth = grey(pm);
  const none = { primaryDeg: null, secondaryDeg: null };
  for (const aligned of [true, false]) {
    const blender = new ArcBlender({ nodesDeg: Float64Array.of(a0, a1), slices, bows: aligned ? [p0.bows, p1.bows] : [none, none] });
    let l1 = 0;
    let sum = 0;
    let worst = 0;
    let peak = 0;
    for (let i = 0; i < truth.count; i++) {
      const psi = truth.fromDeg + i * truth.stepDeg;
      const s = blender.at(mid, psi);
      const v = s.w0 * valueAt(slices[s.k0], s.psi0Deg) + s.w1 * valueAt(slices[s.k1], s.psi1Deg);
      const y = truth.total[3 * i];
      l1 += Math.abs(v - y);
      sum += y;
      worst = Math.max(worst, Math.abs(v - y));
      peak = Math.max(peak, y);
    }
    console.log(
      `nodes ${a0}°/${a1}° at ${mid}° ${aligned ? "aligned" : "plain  "}: L1 ${(l1 / sum).toFixed(3)}, worst ${(worst / peak).toFixed(3)} of the peak; ` +
        `primary ${p0.bows.primaryDeg} / ${pm.bows.primaryDeg} / ${p1.bows.primaryDeg}°`,
    );
  }
}
await pool.close();
