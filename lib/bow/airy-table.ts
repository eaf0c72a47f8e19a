// Ai and Ai′ fast enough for the per-drop loop of the Airy bins: a Taylor step from a dense table of exact values
// on the oscillating side and near zero, the A&S 10.4.60/10.4.62 expansions with a fixed number of terms beyond it.
// lib/special/airy.ts stays the reference (the table is filled from it); this trades its adaptive loops for
// straight-line code and writes into module scratch instead of allocating.

import { airyPair } from "../special/airy.js";

/** Table span: the expansions take over below −TABLE_FAR (their 9th term is then < 1e-18, see below). */
const TABLE_FAR = 32;
/** Table top: beyond it ζ > 42, the 9th term of A&S 10.4.59 is < 3e-14 of the first, and Ai < 1e-18. */
const TABLE_NEAR = 16;
/**
 * Node spacing 1/64, so a step is ≤ 1/128: the Taylor terms of w″ = x·w shrink at least like (√32/128)^n, and
 * TAYLOR_TERMS = 10 leaves < 1e-13 of the envelope (measured against lib/special/airy.ts on −2000 ≤ w ≤ 16).
 * Finer nodes cost more at start-up (filling 1/128 took 60–150 ms per thread) than their shorter steps save.
 */
const NODES_PER_UNIT = 64;
const TAYLOR_TERMS = 10;
const NODE_COUNT = (TABLE_FAR + TABLE_NEAR) * NODES_PER_UNIT + 1;
const SQRT_PI = Math.sqrt(Math.PI);

const nodeAi = new Float64Array(NODE_COUNT);
const nodeAiPrime = new Float64Array(NODE_COUNT);
for (let i = 0; i < NODE_COUNT; i++) {
  const v = airyPair(i / NODES_PER_UNIT - TABLE_FAR);
  nodeAi[i] = v.ai;
  nodeAiPrime[i] = v.aiPrime;
}

// u_k of A&S 10.4.58 and v_k = −(6k+1)/(6k−1)·u_k, k = 1..8: u_k = (6k−5)(6k−3)(6k−1)/((2k−1)·216·k)·u_{k−1}.
const U = new Float64Array(9);
const V = new Float64Array(9);
U[0] = 1;
V[0] = 1;
for (let k = 1; k <= 8; k++) {
  U[k] = (U[k - 1] * (6 * k - 5) * (6 * k - 3) * (6 * k - 1)) / ((2 * k - 1) * 216 * k);
  V[k] = (-(6 * k + 1) / (6 * k - 1)) * U[k];
}

const INVERSE_PAIR = Float64Array.from({ length: TAYLOR_TERMS }, (_, n) => 1 / ((n + 1) * (n + 2)));

/** Ai and Ai′ of the last airyFast call. */
export const airyFastOut = new Float64Array(2);

/** Writes Ai(w), Ai′(w) into airyFastOut. */
export function airyFast(w: number): void {
  if (w < -TABLE_FAR) {
    // A&S 10.4.60, 10.4.62 at z = −w: ζ = (2/3)z^{3/2} > 120, u_9/ζ^9 < 1e-18, so 8 terms reach rounding.
    const z = -w;
    const zeta = (2 / 3) * z * Math.sqrt(z);
    const t = 1 / zeta;
    const t2 = t * t;
    const p = 1 + t2 * (-U[2] + t2 * (U[4] + t2 * (-U[6] + t2 * U[8])));
    const q = t * (U[1] + t2 * (-U[3] + t2 * (U[5] - t2 * U[7])));
    const r = 1 + t2 * (-V[2] + t2 * (V[4] + t2 * (-V[6] + t2 * V[8])));
    const s = t * (V[1] + t2 * (-V[3] + t2 * (V[5] - t2 * V[7])));
    const phase = zeta + Math.PI / 4;
    const sinPhase = Math.sin(phase);
    const cosPhase = Math.cos(phase);
    const z4 = Math.sqrt(Math.sqrt(z));
    airyFastOut[0] = (sinPhase * p - cosPhase * q) / (SQRT_PI * z4);
    airyFastOut[1] = (-z4 * (cosPhase * r + sinPhase * s)) / SQRT_PI;
    return;
  }
  if (w > TABLE_NEAR) {
    // A&S 10.4.59, 10.4.61 with the same 8 terms.
    const zeta = (2 / 3) * w * Math.sqrt(w);
    const t = -1 / zeta;
    const sumU = 1 + t * (U[1] + t * (U[2] + t * (U[3] + t * (U[4] + t * (U[5] + t * (U[6] + t * (U[7] + t * U[8])))))));
    const sumV = 1 + t * (V[1] + t * (V[2] + t * (V[3] + t * (V[4] + t * (V[5] + t * (V[6] + t * (V[7] + t * V[8])))))));
    const e = Math.exp(-zeta) / (2 * SQRT_PI);
    const w4 = Math.sqrt(Math.sqrt(w));
    airyFastOut[0] = (e / w4) * sumU;
    airyFastOut[1] = -e * w4 * sumV;
    return;
  }
  if (!(w >= -TABLE_FAR)) {
    airyFastOut[0] = NaN;
    airyFastOut[1] = NaN;
    return;
  }
  const index = Math.round((w + TABLE_FAR) * NODES_PER_UNIT);
  const x0 = index / NODES_PER_UNIT - TABLE_FAR;
  const h = w - x0;
  // Taylor series of w″ = x·w about x0 (A&S 10.4.1): c_{n+2} = (x0·c_n + c_{n−1}) / ((n+1)(n+2)).
  let cPrev = 0;
  let c0 = nodeAi[index];
  let c1 = nodeAiPrime[index];
  let value = c0 + c1 * h;
  let slope = c1;
  let hPow = h;
  for (let n = 0; n < TAYLOR_TERMS; n++) {
    const c2 = (x0 * c0 + cPrev) * INVERSE_PAIR[n];
    slope += (n + 2) * c2 * hPow;
    hPow *= h;
    value += c2 * hPow;
    cPrev = c0;
    c0 = c1;
    c1 = c2;
  }
  airyFastOut[0] = value;
  airyFastOut[1] = slope;
}
