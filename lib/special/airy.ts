// Airy function Ai and its derivative on the real line (Abramowitz & Stegun 1964 §10.4; DLMF §9).
// |x| ≥ 8: asymptotic expansions truncated at their smallest term (error ≈ e^(−2ζ) ≈ 1e-13 there).
// |x| < 8: Taylor series of the Airy equation about nodes 1/4 apart; nodes are filled once by Taylor
// stepping, towards −8 from the exact values at 0 (oscillatory, so errors stay bounded) and from the
// asymptotic values at +8 back to 0 (Ai grows in that direction, so the unwanted Bi part decays).

/** Ai(0) = 3^(−2/3)/Γ(2/3), A&S 10.4.4. */
export const AIRY_AI_AT_ZERO = 0.355028053887817239;
/** Ai′(0) = −3^(−1/3)/Γ(1/3), A&S 10.4.5. */
export const AIRY_AI_PRIME_AT_ZERO = -0.258819403792806798;

/** First zeros a_k of Ai, k = 1..5 (A&S Table 10.13). */
export const AIRY_AI_ZEROS = [-2.3381074105, -4.0879494441, -5.5205598281, -6.7867080901, -7.9441335871] as const;
/** First zeros a′_k of Ai′, k = 1..5 (A&S Table 10.13); −a′_1 places the main maximum of an Airy bow. */
export const AIRY_AI_PRIME_ZEROS = [-1.0187929716, -3.2481975822, -4.8200992112, -6.1633073556, -7.372177255] as const;

const ASYMPTOTIC_ABS_X = 8;
const NODE_STEP = 0.25;
const NODE_COUNT = Math.round((2 * ASYMPTOTIC_ABS_X) / NODE_STEP) + 1;
const ZERO_NODE = (NODE_COUNT - 1) / 2;
const MAX_TAYLOR_TERMS = 60;
const MAX_ASYMPTOTIC_TERMS = 80;
const SQRT_PI = Math.sqrt(Math.PI);

interface AiryPair {
  ai: number;
  aiPrime: number;
}

// Solution of w″ = x·w about x0 (A&S 10.4.1): coefficients c_{n+2} = (x0·c_n + c_{n−1}) / ((n+1)(n+2)).
function taylorStep(x0: number, w0: number, dw0: number, h: number): AiryPair {
  let cPrev = 0;
  let c0 = w0;
  let c1 = dw0;
  let w = w0 + dw0 * h;
  let dw = dw0;
  let hPow = h;
  let quiet = 0;
  for (let n = 0; n < MAX_TAYLOR_TERMS; n++) {
    const c2 = (x0 * c0 + cPrev) / ((n + 1) * (n + 2));
    const termDw = (n + 2) * c2 * hPow;
    hPow *= h;
    const termW = c2 * hPow;
    w += termW;
    dw += termDw;
    cPrev = c0;
    c0 = c1;
    c1 = c2;
    const small = Math.abs(termW) <= 1e-18 * Math.abs(w) && Math.abs(termDw) <= 1e-18 * Math.abs(dw);
    quiet = small ? quiet + 1 : 0;
    if (quiet >= 3) break;
  }
  return { ai: w, aiPrime: dw };
}

// u_k of A&S 10.4.58: u_k = (6k−5)(6k−3)(6k−1) / ((2k−1)·216·k) · u_{k−1}; v_k = −(6k+1)/(6k−1) · u_k.
function uRatio(k: number): number {
  return ((6 * k - 5) * (6 * k - 3) * (6 * k - 1)) / ((2 * k - 1) * 216 * k);
}
function vOverU(k: number): number {
  return -(6 * k + 1) / (6 * k - 1);
}

// A&S 10.4.59 and 10.4.61 (x → +∞).
function asymptoticPositive(x: number): AiryPair {
  const zeta = (2 / 3) * x * Math.sqrt(x);
  let uTerm = 1;
  let sumU = 1;
  let sumV = 1;
  let previous = Infinity;
  for (let k = 1; k < MAX_ASYMPTOTIC_TERMS; k++) {
    uTerm *= -uRatio(k) / zeta;
    const size = Math.abs(uTerm);
    if (size >= previous || size < 1e-17) break;
    previous = size;
    sumU += uTerm;
    sumV += vOverU(k) * uTerm;
  }
  const e = Math.exp(-zeta) / (2 * SQRT_PI);
  const x4 = Math.sqrt(Math.sqrt(x));
  return { ai: (e / x4) * sumU, aiPrime: -e * x4 * sumV };
}

// A&S 10.4.60 and 10.4.62 (x = −z, z → +∞).
function asymptoticNegative(z: number): AiryPair {
  const zeta = (2 / 3) * z * Math.sqrt(z);
  let term = 1;
  let p = 1; // Σ (−1)^k u_2k ζ^−2k
  let q = 0; // Σ (−1)^k u_2k+1 ζ^−2k−1
  let r = 1; // Σ (−1)^k v_2k ζ^−2k
  let s = 0; // Σ (−1)^k v_2k+1 ζ^−2k−1
  let previous = Infinity;
  for (let k = 1; k < MAX_ASYMPTOTIC_TERMS; k++) {
    term *= uRatio(k) / zeta;
    const size = Math.abs(term);
    if (size >= previous || size < 1e-17) break;
    previous = size;
    const sign = Math.floor(k / 2) % 2 === 0 ? 1 : -1;
    const vTerm = vOverU(k) * term;
    if (k % 2 === 0) {
      p += sign * term;
      r += sign * vTerm;
    } else {
      q += sign * term;
      s += sign * vTerm;
    }
  }
  const phase = zeta + Math.PI / 4;
  const sinPhase = Math.sin(phase);
  const cosPhase = Math.cos(phase);
  const z4 = Math.sqrt(Math.sqrt(z));
  return {
    ai: (sinPhase * p - cosPhase * q) / (SQRT_PI * z4),
    aiPrime: (-z4 * (cosPhase * r + sinPhase * s)) / SQRT_PI,
  };
}

function nodeX(index: number): number {
  return (index - ZERO_NODE) * NODE_STEP;
}

function buildNodes(): { ai: Float64Array; aiPrime: Float64Array } {
  const ai = new Float64Array(NODE_COUNT);
  const aiPrime = new Float64Array(NODE_COUNT);
  ai[ZERO_NODE] = AIRY_AI_AT_ZERO;
  aiPrime[ZERO_NODE] = AIRY_AI_PRIME_AT_ZERO;
  for (let i = ZERO_NODE - 1; i >= 0; i--) {
    const next = taylorStep(nodeX(i + 1), ai[i + 1], aiPrime[i + 1], -NODE_STEP);
    ai[i] = next.ai;
    aiPrime[i] = next.aiPrime;
  }
  const last = NODE_COUNT - 1;
  const start = asymptoticPositive(nodeX(last));
  ai[last] = start.ai;
  aiPrime[last] = start.aiPrime;
  for (let i = last - 1; i > ZERO_NODE; i--) {
    const next = taylorStep(nodeX(i + 1), ai[i + 1], aiPrime[i + 1], -NODE_STEP);
    ai[i] = next.ai;
    aiPrime[i] = next.aiPrime;
  }
  return { ai, aiPrime };
}

const NODES = buildNodes();

/** Ai(x) and Ai′(x) together. */
export function airyPair(x: number): AiryPair {
  if (Number.isNaN(x)) return { ai: NaN, aiPrime: NaN };
  if (x >= ASYMPTOTIC_ABS_X) return asymptoticPositive(x);
  if (x <= -ASYMPTOTIC_ABS_X) return asymptoticNegative(-x);
  const index = Math.round(x / NODE_STEP) + ZERO_NODE;
  const x0 = nodeX(index);
  return taylorStep(x0, NODES.ai[index], NODES.aiPrime[index], x - x0);
}

export function airyAi(x: number): number {
  return airyPair(x).ai;
}

export function airyAiPrime(x: number): number {
  return airyPair(x).aiPrime;
}
