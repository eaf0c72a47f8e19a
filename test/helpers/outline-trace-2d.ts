// An independent 2D ray trace through a drop's vertical outline, for checks of the 3D tracer and of the bows it makes.

import type { DropOutline } from "../../lib/drops/shape/outline.js";

const DEG = Math.PI / 180;

/**
 * The extreme scattering angle of order p over rays in the vertical plane through the drop's axis, by an
 * independent 2D trace: the outline as the parametric curve P(θ) = r(θ)(sin θ, −cos θ) in (horizontal, up)
 * coordinates, θ ∈ (−π, π]; crossings of a line by sign changes of (P − o) × d refined by bisection; normals from
 * the tangent dP/dθ; Snell's law in vector form (Born & Wolf 1999 §3.2.2, from memory).
 */
export function bowAngle2d(outline: DropOutline, nWater: number, sunDeg: number, p: number, side: 1 | -1, nearDeg: number): number {
  const h = sunDeg * DEG;
  const dIn = [Math.cos(h), -Math.sin(h)];
  // The half-plane towards e = −(sin h, cos h) (the top of the bow) for side +1.
  const e = [-Math.sin(h), -Math.cos(h)];
  const P = (t: number) => {
    const r = outline.radius(Math.cos(t));
    return [r * Math.sin(t), -r * Math.cos(t)];
  };
  const crossings = (o: number[], d: number[]) => {
    const g = (t: number) => {
      const q = P(t);
      return (q[0] - o[0]) * d[1] - (q[1] - o[1]) * d[0];
    };
    const out: number[] = [];
    // 1440 steps (0.25°) bracket every crossing of a convex outline; 60 bisections reach rounding.
    const steps = 1440;
    for (let s = 0; s < steps; s++) {
      let a = -Math.PI + (2 * Math.PI * s) / steps;
      let b = a + (2 * Math.PI) / steps;
      if (g(a) * g(b) > 0) continue;
      for (let it = 0; it < 60; it++) {
        const m = 0.5 * (a + b);
        if (g(a) * g(m) <= 0) b = m;
        else a = m;
      }
      out.push(0.5 * (a + b));
    }
    return out;
  };
  const along = (o: number[], d: number[], t: number) => {
    const q = P(t);
    return (q[0] - o[0]) * d[0] + (q[1] - o[1]) * d[1];
  };
  const outward = (t: number) => {
    const a = P(t - 1e-7);
    const b = P(t + 1e-7);
    const tx = b[0] - a[0];
    const tz = b[1] - a[1];
    const len = Math.hypot(tx, tz);
    // θ increases counter-clockwise from the bottom in (x right, z up): the outward normal is (tz, −tx).
    return [tz / len, -tx / len];
  };
  const refract = (d: number[], nu: number[], ratio: number) => {
    // ν faces the incident side.
    const cosI = -(d[0] * nu[0] + d[1] * nu[1]);
    const cosT = Math.sqrt(1 - ratio * ratio * (1 - cosI * cosI));
    return [ratio * d[0] + (ratio * cosI - cosT) * nu[0], ratio * d[1] + (ratio * cosI - cosT) * nu[1]];
  };
  const reflect = (d: number[], nu: number[]) => {
    const c = d[0] * nu[0] + d[1] * nu[1];
    return [d[0] - 2 * c * nu[0], d[1] - 2 * c * nu[1]];
  };
  const angleOf = (u: number): number => {
    let o = [u * e[0] - 5 * dIn[0], u * e[1] - 5 * dIn[1]];
    let d = dIn;
    const entry = crossings(o, d).sort((a, b) => along(o, d, a) - along(o, d, b))[0];
    if (entry === undefined) return Number.NaN;
    let nu = outward(entry);
    d = refract(d, nu, 1 / nWater);
    o = P(entry);
    for (let k = 0; k < p; k++) {
      const next = crossings(o, d)
        .filter((t) => along(o, d, t) > 1e-9)
        .sort((a, b) => along(o, d, a) - along(o, d, b))[0];
      o = P(next);
      nu = outward(next);
      d = k === p - 1 ? refract(d, [-nu[0], -nu[1]], nWater) : reflect(d, nu);
    }
    const signed = Math.atan2(d[0] * e[0] + d[1] * e[1], d[0] * dIn[0] + d[1] * dIn[1]);
    return side * signed > 0 ? (side * signed) / DEG : Number.NaN;
  };
  // Scan the pupil for interior extrema of Θ(u); keep the one nearest the sphere's bow; golden-section search.
  const us = Array.from({ length: 481 }, (_, i) => -1.2 + (2.4 * i) / 480);
  const values = us.map((u) => angleOf(u));
  let best = -1;
  for (let i = 1; i + 1 < values.length; i++) {
    const [l, m, r] = [values[i - 1], values[i], values[i + 1]];
    if (Number.isNaN(l) || Number.isNaN(m) || Number.isNaN(r) || (m - l) * (r - m) >= 0 || Math.abs(r - l) > 90) continue;
    if (best < 0 || Math.abs(m - nearDeg) < Math.abs(values[best] - nearDeg)) best = i;
  }
  const isMax = values[best] > values[best - 1];
  let a = us[best - 1];
  let b = us[best + 1];
  const g = (Math.sqrt(5) - 1) / 2;
  const score = (u: number) => (isMax ? -angleOf(u) : angleOf(u));
  for (let it = 0; it < 60; it++) {
    const c = b - g * (b - a);
    const d = a + g * (b - a);
    if (score(c) < score(d)) b = d;
    else a = c;
  }
  return angleOf(0.5 * (a + b));
}
