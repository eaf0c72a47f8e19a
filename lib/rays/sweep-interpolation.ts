// A plane sweep (lib/rays/plane-sweep.ts) at any refractive index between a few traced ones. Sweeps of one drop
// outline, orientation and plane at different n share their pupil samples u_s (the pupil's edge is found with the
// reflected order, which does not depend on n), and every quantity a sample carries (Θ, amplitudes, optical path,
// exit offset) is a smooth function of n at fixed u as long as the ray leaves in the plane at every node. So each
// sample is interpolated across n by Lagrange's formula (Press et al. 2007, Numerical Recipes §3.2, Eq. 3.2.1) on
// Chebyshev nodes (ibid. §5.8: they keep the interpolation error near its minimax value, ~ (Δn/2)^M·f^(M)/(2^(M−1)·M!)).

import { emptySweep, setPowers, storeRay, unwrap, type PlaneSweep, type PlaneTracer } from "./plane-sweep.js";
import { sweepBranches } from "./lost-roots.js";

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
 * a co-polar amplitude (PlaneTracer.planeRay signs |A| by its real part: where total internal reflection makes A
 * complex, it jumps as the real part changes sign, and no polynomial follows a jump), and where the error estimate exceeds the tolerances (Θ and W turn fast with n near grazing). The estimate is the next term of
 * Newton's form, |f[n₀…n_{M−1}]·Π(n − n_k)| (Press et al. 2007 §3.2; it bounds the error of the interpolant one
 * degree lower, so it errs on the safe side). With `near`, samples whose |Θ| lies on one side of it at every node
 * are never traced: kept where interpolation serves, else left out. Signed angles are unwrapped against the first node's, so that a ray near Θ = ±180° is not averaged
 * across the cut. The other roots beyond the sweep's folds (PlaneSweep.branches, lib/rays/fold-back.ts) are traced at n.
 */
export function interpolateSweep(
  sweeps: readonly PlaneSweep[],
  nodes: readonly number[],
  n: number,
  tracer: PlaneTracer,
  near?: { loRad: number; hiRad: number },
): { sweep: PlaneSweep; traced: number } {
  const first = sweeps[0];
  const count = first.u.length;
  const M = sweeps.length;
  for (const sweep of sweeps) {
    let same = sweep.u.length === count && sweep.order === first.order;
    for (let s = 0; same && s < count; s++) same = sweep.u[s] === first.u[s];
    if (!same) throw new RangeError("sweeps to interpolate must share their order and pupil samples");
  }
  const w = lagrangeWeights(nodes, n);
  // Newton's top coefficient is Σ f_k / Π_{j≠k}(n_k − n_j); times ω(n) = Π(n − n_k) it is the next term.
  const top = nodes.map((nk, k) => 1 / nodes.reduce((prod, nj, j) => (j === k ? prod : prod * (nk - nj)), 1));
  const omega = Math.abs(nodes.reduce((prod, nk) => prod * (n - nk), 1));
  const out = emptySweep(first.order, first.u);
  const loRad = near?.loRad ?? -Infinity;
  const hiRad = near?.hiRad ?? Infinity;
  const retrace = new Uint8Array(count);
  // Node by node over every sample (the inner loops run along one sweep's arrays; the sums over the nodes are added in
  // node order, as sample by sample): which nodes have the ray, on which side of `near` they send it, and whether its
  // amplitudes keep their signs.
  const { okNodes, below, above, signsDiffer, eligible, sums } = workArrays(count);
  okNodes.fill(0);
  below.fill(0);
  above.fill(0);
  signsDiffer.fill(0);
  const firstPerp = first.perpAmp;
  const firstPar = first.parAmp;
  for (let k = 0; k < M; k++) {
    const { ok, thetaSigned, perpAmp, parAmp } = sweeps[k];
    for (let s = 0; s < count; s++) {
      if (!ok[s]) continue;
      okNodes[s]++;
      const t = Math.abs(thetaSigned[s]);
      if (t < loRad) below[s]++;
      if (t > hiRad) above[s]++;
      if (Math.sign(perpAmp[s]) !== Math.sign(firstPerp[s]) || Math.sign(parAmp[s]) !== Math.sign(firstPar[s])) signsDiffer[s] = 1;
    }
  }
  // The interpolated values and Newton's top coefficients of Θ, W, Ã⊥, Ã∥ where every node has the ray.
  const [theta, thetaTop, pathTop, perpTop, parTop, amplitude, perp, par, path, offset, v, perpCrossTop, parCrossTop, perpCross, parCross] = sums;
  for (const sum of sums) sum.fill(0);
  const firstTheta = first.thetaSigned;
  let eligibleCount = 0;
  for (let s = 0; s < count; s++) if (okNodes[s] === M && !signsDiffer[s]) eligible[eligibleCount++] = s;
  for (let k = 0; k < M; k++) {
    const { thetaSigned: thetaK, perpAmp: perpK, parAmp: parK, perpCross: perpCrossK, parCross: parCrossK, path: pathOfK, offset: offsetK, v: vK } = sweeps[k];
    const wk = w[k];
    const topK = top[k];
    for (let e = 0; e < eligibleCount; e++) {
      const s = eligible[e];
      const t0 = firstTheta[s];
      const t = t0 + unwrap(thetaK[s] - t0);
      const a = perpK[s];
      const b = parK[s];
      const c = perpCrossK[s];
      const d = parCrossK[s];
      const pathK = pathOfK[s];
      theta[s] += wk * t;
      thetaTop[s] += topK * t;
      pathTop[s] += topK * pathK;
      perpTop[s] += topK * a;
      parTop[s] += topK * b;
      perpCrossTop[s] += topK * c;
      parCrossTop[s] += topK * d;
      amplitude[s] = Math.max(amplitude[s], Math.abs(a), Math.abs(b), Math.abs(c), Math.abs(d));
      perp[s] += wk * a;
      par[s] += wk * b;
      perpCross[s] += wk * c;
      parCross[s] += wk * d;
      path[s] += wk * pathK;
      offset[s] += wk * offsetK[s];
      v[s] += wk * vK[s];
    }
  }
  for (let s = 0; s < count; s++) {
    if (okNodes[s] === 0) continue;
    // Far from the angles of interest a sample only joins its neighbours (a fold's run, a segment's power that
    // crosses the grid): it is interpolated where that can be trusted, else left out, and never traced.
    const far = below[s] === okNodes[s] || above[s] === okNodes[s];
    if (okNodes[s] < M || signsDiffer[s]) {
      if (!far) retrace[s] = 1;
      continue;
    }
    const trusted =
      Math.abs(thetaTop[s]) * omega <= THETA_TOLERANCE_RAD &&
      Math.abs(pathTop[s]) * omega <= PATH_TOLERANCE &&
      Math.max(Math.abs(perpTop[s]), Math.abs(parTop[s]), Math.abs(perpCrossTop[s]), Math.abs(parCrossTop[s])) * omega <= AMPLITUDE_TOLERANCE * amplitude[s];
    if (!trusted) {
      // Far from the grid an untrusted sample is left out (a gap there only ends a run where its light is far from
      // the grid; kept, its error could make a spurious turn of Θ). Near it, the interpolated v is close enough for
      // Newton's search to start from.
      if (!far) {
        retrace[s] = 2;
        out.v[s] = v[s];
      }
      continue;
    }
    out.ok[s] = 1;
    out.thetaSigned[s] = unwrap(theta[s]);
    out.perpAmp[s] = perp[s];
    out.parAmp[s] = par[s];
    out.perpCross[s] = perpCross[s];
    out.parCross[s] = parCross[s];
    out.path[s] = path[s];
    out.offset[s] = offset[s];
    out.v[s] = v[s];
    let yvSign = first.yvSign[s];
    for (let k = 1; k < M; k++) if (sweeps[k].yvSign[s] !== yvSign) yvSign = 0;
    out.yvSign[s] = yvSign;
    setPowers(out, s);
  }
  // Traced outwards from the pupil's centre, as sweepPlane traces: Newton's search starts from the interpolated v
  // where all nodes have the ray, else from the nearest ray at n further in (as sweepPlane continues from its last
  // ray), then from the next ray out where interpolation served it, then from each node's ray at this sample. The later
  // guesses find a few rays near the rim that sweepPlane's continuation misses (measured: one in 8000, at the grid's edge).
  // Beyond the last sample any node has, the ray may still leave at n (the nodes lie inside the range of indices, so
  // the ends of the range are extrapolated, and the order's end near the rim moves with n): given `near`, the sweep goes
  // on outwards from a ray at n within it until a sample has none (measured: up to 4 more samples at 760–780 nm).
  let traced = 0;
  const centre = (count - 1) / 2;
  for (let k = 0; k < count; k++) {
    // The centre and the + side outwards, then the − side outwards.
    const s = k < count - centre ? centre + k : centre - 1 - (k - (count - centre));
    const step = s >= centre ? -1 : 1;
    const before = s + step;
    const extend = near !== undefined && !retrace[s] && !out.ok[s] && before >= 0 && before < count && out.ok[before] && Math.abs(out.thetaSigned[before]) >= loRad && Math.abs(out.thetaSigned[before]) <= hiRad && sweeps.every((sweep) => !sweep.ok[s]);
    if (!retrace[s] && !extend) continue;
    traced++;
    let inner = before;
    while (inner >= 0 && inner < count && !out.ok[inner]) inner += step;
    const outer = s - step;
    const guesses = [
      ...(retrace[s] === 2 ? [out.v[s]] : []),
      ...(inner >= 0 && inner < count ? [out.v[inner]] : []),
      ...(outer >= 0 && outer < count && out.ok[outer] ? [out.v[outer]] : []),
      ...sweeps.filter((sweep) => sweep.ok[s]).map((sweep) => sweep.v[s]),
    ];
    for (const guess of guesses) {
      const ray = tracer.planeRay(first.u[s], guess, first.order);
      if (ray === null) continue;
      storeRay(out, s, ray);
      break;
    }
  }
  // The other roots (beyond the interpolated sweep's folds, lost at its gaps and hops, found by census), traced at n:
  // they are not interpolated across the nodes.
  out.branches = sweepBranches(tracer, out, near);
  return { sweep: out, traced };
}

/** Work arrays of interpolateSweep, kept between calls (one thread runs one call at a time). */
interface Scratch {
  okNodes: Uint8Array;
  below: Uint8Array;
  above: Uint8Array;
  signsDiffer: Uint8Array;
  /** The samples every node has the ray at, with the same signs. */
  eligible: Int32Array;
  sums: Float64Array[];
}
let work: Scratch | null = null;
function workArrays(count: number): Scratch {
  if (work === null || work.okNodes.length !== count) {
    work = {
      okNodes: new Uint8Array(count),
      below: new Uint8Array(count),
      above: new Uint8Array(count),
      signsDiffer: new Uint8Array(count),
      eligible: new Int32Array(count),
      sums: Array.from({ length: 15 }, () => new Float64Array(count)),
    };
  }
  return work;
}
