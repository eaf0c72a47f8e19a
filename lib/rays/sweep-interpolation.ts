// A plane sweep (lib/rays/plane-sweep.ts) at any refractive index between a few traced ones. Sweeps of one drop
// outline, orientation and plane at different n share their pupil samples u_s (the pupil's edge is found with the
// reflected order, which does not depend on n), and every quantity a sample carries (Θ, amplitudes, optical path,
// exit offset) is a smooth function of n at fixed u as long as the ray leaves in the plane at every node. So each
// sample is interpolated across n by Lagrange's formula (Press et al. 2007, Numerical Recipes §3.2, Eq. 3.2.1) on
// Chebyshev nodes (ibid. §5.8: they keep the interpolation error near its minimax value, ~ (Δn/2)^M·f^(M)/(2^(M−1)·M!)).

import { emptySweep, storeRay, type PlaneSweep, type PlaneTracer } from "./plane-sweep.js";

/** M Chebyshev nodes of the first kind over [lo, hi] (Press et al. 2007 Eq. 5.8.4), ascending. */
export function chebyshevNodes(lo: number, hi: number, count: number): number[] {
  const mid = 0.5 * (lo + hi);
  const half = 0.5 * (hi - lo);
  return Array.from({ length: count }, (_, k) => mid - half * Math.cos(((2 * k + 1) * Math.PI) / (2 * count)));
}

/** Lagrange weights ℓ_k(x) of the nodes (Press et al. 2007 Eq. 3.2.1). */
export function lagrangeWeights(nodes: readonly number[], x: number): Float64Array {
  const weights = new Float64Array(nodes.length);
  for (let k = 0; k < nodes.length; k++) {
    let w = 1;
    for (let j = 0; j < nodes.length; j++) if (j !== k) w *= (x - nodes[j]) / (nodes[k] - nodes[j]);
    weights[k] = w;
  }
  return weights;
}

/** Brings an angle into (−π, π]. */
function wrap(angle: number): number {
  if (angle > Math.PI) return angle - 2 * Math.PI;
  if (angle <= -Math.PI) return angle + 2 * Math.PI;
  return angle;
}

/**
 * Whether every node's signed amplitude has one sign at sample s. A signed amplitude is ±√(co-polar² + cross-polar²)
 * with the co-polar term's sign (PlaneTracer.planeRay): where the co-polar term changes sign (the parallel field
 * near Brewster's angle) and a tilted drop adds a cross-polar term, it jumps, and no polynomial in n follows a jump.
 */
function sameSign(sweeps: readonly PlaneSweep[], field: "perpAmp" | "parAmp", s: number): boolean {
  const sign = Math.sign(sweeps[0][field][s]);
  return sweeps.every((sweep) => Math.sign(sweep[field][s]) === sign);
}

/**
 * Largest interpolation error let stand, on Θ (radians) and on the optical path W (units of a): a bin's ray lands
 * 1e-9 rad from where it should (bins are ≥ 1e-4 rad), and the phase x·W of a bow's ray moves by ≤ 1e-4 rad up to
 * x = 1e5 (a 6 mm drop in blue light). Samples whose estimated error is larger are traced at n instead.
 */
export const THETA_TOLERANCE_RAD = 1e-9;
export const PATH_TOLERANCE = 1e-9;
/**
 * Largest interpolation error let stand on an amplitude, relative to the sample's largest amplitude (|Ã⊥| or |Ã∥|):
 * intensities then move by < 2e-5. Near a transverse caustic (∂Y/∂v → 0, where a flattened or canted drop's rays
 * cross the plane) Ã = A/√|∂Y/∂v| is no polynomial in n.
 */
export const AMPLITUDE_TOLERANCE = 1e-5;

/**
 * The sweep at n from sweeps of the same order and pupil samples at nodes[k] (ascending, around n), with `tracer`
 * at n for the samples interpolation does not serve: where the nodes disagree on whether the ray leaves in the
 * plane (the ends of the order near the rim, where total reflection or a missed drop depends on n) or on the sign of
 * an amplitude (sameSign), and where the
 * error estimate exceeds the tolerances (Θ and W turn fast with n near grazing). The estimate is the next term of
 * Newton's form, |f[n₀…n_{M−1}]·Π(n − n_k)| (Press et al. 2007 §3.2; it bounds the error of the interpolant one
 * degree lower, so it errs on the safe side). Signed angles are unwrapped against the first node's, so that a ray
 * near Θ = ±180° is not averaged across the cut.
 */
export function interpolateSweep(sweeps: readonly PlaneSweep[], nodes: readonly number[], n: number, tracer: PlaneTracer): { sweep: PlaneSweep; traced: number } {
  const first = sweeps[0];
  const count = first.u.length;
  for (const sweep of sweeps) {
    if (sweep.u.length !== count || sweep.order !== first.order || sweep.u.some((u, s) => u !== first.u[s])) {
      throw new RangeError("sweeps to interpolate must share their order and pupil samples");
    }
  }
  const w = lagrangeWeights(nodes, n);
  // Newton's top coefficient is Σ f_k / Π_{j≠k}(n_k − n_j); times ω(n) = Π(n − n_k) it is the next term.
  const top = nodes.map((nk, k) => 1 / nodes.reduce((prod, nj, j) => (j === k ? prod : prod * (nk - nj)), 1));
  const omega = Math.abs(nodes.reduce((prod, nk) => prod * (n - nk), 1));
  const out = emptySweep(first.order, first.u);
  const fields = ["perpAmp", "parAmp", "path", "offset", "v"] as const;
  const retrace = new Uint8Array(count);
  for (let s = 0; s < count; s++) {
    let okNodes = 0;
    for (const sweep of sweeps) okNodes += sweep.ok[s];
    if (okNodes === 0) continue;
    if (okNodes < sweeps.length || !sameSign(sweeps, "perpAmp", s) || !sameSign(sweeps, "parAmp", s)) {
      retrace[s] = 1;
      continue;
    }
    const t0 = first.thetaSigned[s];
    // The interpolated Θ and, per quantity, Newton's top coefficient (next[]: Θ, W, Ã⊥, Ã∥).
    let theta = 0;
    const next = [0, 0, 0, 0];
    let amplitude = 0;
    for (let k = 0; k < sweeps.length; k++) {
      const sweep = sweeps[k];
      const t = t0 + wrap(sweep.thetaSigned[s] - t0);
      theta += w[k] * t;
      next[0] += top[k] * t;
      next[1] += top[k] * sweep.path[s];
      next[2] += top[k] * sweep.perpAmp[s];
      next[3] += top[k] * sweep.parAmp[s];
      amplitude = Math.max(amplitude, Math.abs(sweep.perpAmp[s]), Math.abs(sweep.parAmp[s]));
    }
    const [thetaNext, pathNext, perpNext, parNext] = next.map((c) => Math.abs(c) * omega);
    if (thetaNext > THETA_TOLERANCE_RAD || pathNext > PATH_TOLERANCE || Math.max(perpNext, parNext) > AMPLITUDE_TOLERANCE * amplitude) {
      retrace[s] = 1;
      continue;
    }
    out.ok[s] = 1;
    out.thetaSigned[s] = wrap(theta);
    for (const field of fields) {
      let value = 0;
      for (let k = 0; k < sweeps.length; k++) value += w[k] * sweeps[k][field][s];
      out[field][s] = value;
    }
    out.perpPerU[s] = out.perpAmp[s] ** 2;
    out.parPerU[s] = out.parAmp[s] ** 2;
  }
  // Traced outwards from the pupil's centre, as sweepPlane traces: Newton's search starts from the nearest ray at n
  // further in (as sweepPlane continues from its last ray), then from each node's ray at this sample. The second
  // guesses find a few rays near the rim that sweepPlane's continuation misses (measured: one in 8000, at the grid's edge).
  let traced = 0;
  const centre = (count - 1) / 2;
  const order = [...Array.from({ length: count - centre }, (_, k) => centre + k), ...Array.from({ length: centre }, (_, k) => centre - 1 - k)];
  for (const s of order) {
    if (!retrace[s]) continue;
    traced++;
    const step = s >= centre ? -1 : 1;
    let inner = s + step;
    while (inner >= 0 && inner < count && !out.ok[inner]) inner += step;
    const guesses = [...(inner >= 0 && inner < count ? [out.v[inner]] : []), ...sweeps.filter((sweep) => sweep.ok[s]).map((sweep) => sweep.v[s])];
    for (const guess of guesses) {
      const ray = tracer.planeRay(first.u[s], guess, first.order);
      if (ray === null) continue;
      storeRay(out, s, ray);
      break;
    }
  }
  return { sweep: out, traced };
}
