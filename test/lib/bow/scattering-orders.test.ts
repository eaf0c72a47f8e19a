import { describe, it, expect } from "vitest";
import { dropRow, dropRowContext, mieRows } from "../../../lib/bow/drop-rows.js";
import { RAY_ORDERS, type DropEngine } from "../../../lib/bow/volume-scattering.js";
import { ORDER_LAYERS, orderVariant, remainderOf } from "../../../lib/bow/scattering-orders.js";
import { kernelRows } from "../../../lib/bow/kernel-rows.js";
import { debyeCoefficients, debyeOrderFromSurface, debyeRemainderFromSurface, debyeSurfaceCoefficients } from "../../../lib/mie/debye.js";
import { mieCoefficients } from "../../../lib/mie/coefficients.js";
import { mieAmplitudes } from "../../../lib/mie/amplitudes.js";

const MEDIUM = { wavelengthNm: 550, mRe: 1.3336, mIm: 0, nAir: 1.00027 };
const DEG = Math.PI / 180;

/**
 * Scattering angle Θ of the bow of k internal reflections from Descartes' minimum deviation, computed here apart
 * from lib/rays: cos² i = (n² − 1)/(k² + 2k) (Descartes 1637; van de Hulst 1957 §13.21), sin r = sin i / n, deviation
 * D = 2(i − r) + k(π − 2r), and Θ = D folded into 0…180°.
 */
function descartesThetaDeg(n: number, k: number): number {
  const i = Math.acos(Math.sqrt((n * n - 1) / (k * k + 2 * k)));
  const r = Math.asin(Math.sin(i) / n);
  const d = (2 * (i - r) + k * (Math.PI - 2 * r)) % (2 * Math.PI);
  return (d > Math.PI ? 2 * Math.PI - d : d) / DEG;
}

function row(engine: DropEngine, radiusUm: number, thetaDeg: Float64Array, step: number, order?: number) {
  const ctx = dropRowContext(MEDIUM, thetaDeg, step, new Set([engine]), order);
  const perp = new Float64Array(thetaDeg.length);
  const par = new Float64Array(thetaDeg.length);
  dropRow(ctx, engine, radiusUm, perp, par);
  return { perp, par };
}

const maxOf = (a: Float64Array) => a.reduce((m, v) => Math.max(m, v), 0);

describe("rows by scattering order (Debye series: van de Hulst 1957 §12.1; Hovenac & Lock 1992, J. Opt. Soc. Am. A 9, 781)", () => {
  it("the Debye terms p = 0..3 and the remainder p ≥ 4 rebuild the Lorenz–Mie amplitudes S1, S2 (Nussenzveig 1969; Hovenac & Lock 1992)", () => {
    // The layers' decomposition: S = Σ_{p≤3} S_p + S_{p≥4} exactly (the series of each a_n, b_n is geometric in
    // R11). Tolerance 1e-12 of the largest |S| (forward peak), as in test/lib/mie/debye.test.ts for p ≤ 6.
    const cosT = Float64Array.from({ length: 181 }, (_, i) => Math.cos(i * DEG));
    for (const x of [50, 600]) {
      const mie = mieAmplitudes(mieCoefficients(MEDIUM.mRe, 0, x), cosT);
      const surface = debyeSurfaceCoefficients(MEDIUM.mRe, 0, x);
      const parts = [...ORDER_LAYERS.map((l) => debyeOrderFromSurface(surface, l.order)), debyeRemainderFromSurface(surface, 3)].map((c) => mieAmplitudes(c, cosT));
      const peak = Math.hypot(mie.s1Re[0], mie.s1Im[0]);
      for (let j = 0; j < cosT.length; j++) {
        const sum = (k: "s1Re" | "s1Im" | "s2Re" | "s2Im") => parts.reduce((s, a) => s + a[k][j], 0);
        expect(Math.hypot(sum("s1Re") - mie.s1Re[j], sum("s1Im") - mie.s1Im[j]) / peak).toBeLessThan(1e-12);
        expect(Math.hypot(sum("s2Re") - mie.s2Re[j], sum("s2Im") - mie.s2Im[j]) / peak).toBeLessThan(1e-12);
      }
    }
  });

  it("a Lorenz–Mie row of order p is |S1|², |S2|² of the Debye coefficients of order p, in both the one-drop and the many-drop paths", () => {
    const thetaDeg = Float64Array.from({ length: 241 }, (_, j) => 120 + 0.1 * j);
    const x = (2 * Math.PI * MEDIUM.nAir * 20e-6) / (MEDIUM.wavelengthNm * 1e-9);
    const cosT = thetaDeg.map((t) => Math.cos(t * DEG));
    for (const { order } of ORDER_LAYERS) {
      const a = mieAmplitudes(debyeCoefficients(MEDIUM.mRe, MEDIUM.mIm, x, order), cosT);
      const got = row("mie", 20, thetaDeg, 0.1, order);
      const many = mieRows(dropRowContext(MEDIUM, thetaDeg, 0.1, new Set(["mie"]), order), [{ radiusUm: 20 }]).rows[0];
      for (let j = 0; j < thetaDeg.length; j++) {
        // x rounded differently from the row's own (k·r): 1e-10 of the row's largest value.
        expect(Math.abs(got.perp[j] - (a.s1Re[j] ** 2 + a.s1Im[j] ** 2))).toBeLessThan(1e-10 * maxOf(got.perp));
        expect(Math.abs(got.par[j] - (a.s2Re[j] ** 2 + a.s2Im[j] ** 2))).toBeLessThan(1e-10 * maxOf(got.par));
        // The SIMD kernel sums in another order: equal to rounding (1e-12 relative).
        expect(Math.abs(many.perp[j] - got.perp[j])).toBeLessThanOrEqual(1e-12 * got.perp[j] + 1e-300);
      }
    }
  });

  for (const [engine, radiusUm] of [["airy", 400], ["geometric", 1500]] as const) {
    it(`the ${engine} engine's rows of orders p = 0..6 add up to its whole row (its orders add incoherently)`, () => {
      const thetaDeg = Float64Array.from({ length: 1201 }, (_, j) => 120 + 0.05 * j);
      const whole = row(engine, radiusUm, thetaDeg, 0.05);
      const parts = RAY_ORDERS.map((p) => row(engine, radiusUm, thetaDeg, 0.05, p));
      const rest = new Float64Array(thetaDeg.length);
      for (const half of ["perp", "par"] as const) {
        remainderOf(whole[half], parts.map((p) => p[half]), rest);
        // Sums of the same bins in another order: 1e-12 of the row's peak.
        expect(maxOf(rest.map(Math.abs)) / maxOf(whole[half])).toBeLessThan(1e-12);
      }
    });
  }

  for (const [engine, radiusUm] of [["mie", 150], ["airy", 400]] as const) {
    it(`${engine}, ${radiusUm} µm: the primary order is dark inside Alexander's dark band, where the whole drop is not`, () => {
      const primaryDeg = descartesThetaDeg(MEDIUM.mRe, 1);
      const secondaryDeg = descartesThetaDeg(MEDIUM.mRe, 2);
      // Descartes' angles for n = 1.3336: Θ ≈ 137.7° and 129.0° (ψ ≈ 42.3°, 51.0°).
      expect(primaryDeg).toBeCloseTo(137.7, 0);
      expect(secondaryDeg).toBeCloseTo(129.0, 0);
      const thetaDeg = Float64Array.from({ length: 1001 }, (_, j) => 120 + 0.025 * j);
      const total = (r: { perp: Float64Array; par: Float64Array }) => r.perp.map((v, j) => v + r.par[j]);
      const primary = total(row(engine, radiusUm, thetaDeg, 0.025, 2));
      const whole = total(row(engine, radiusUm, thetaDeg, 0.025));
      // The band's middle 2°, over 3° from either bow: a bow's dark side fades over an Airy width ~ x^(−2/3), about
      // 0.7° for a 150 µm drop (van de Hulst 1957 §13.23), so nearer the bows a small drop's band is not dark.
      const middle = (primaryDeg + secondaryDeg) / 2;
      const inBand = (t: number) => Math.abs(t - middle) < 1;
      const band = (v: Float64Array) => maxOf(v.filter((_, j) => inBand(thetaDeg[j])));
      const wholeBandMin = whole.filter((_, j) => inBand(thetaDeg[j])).reduce((m, v) => Math.min(m, v), Infinity);
      // Goals 1e-3 of the order's peak and 5 % of the whole drop there. Measured: Lorenz–Mie (Debye p = 2)
      // 2.5e-8 and 2.6e-6; the airy engine 5e-20 and 6e-18.
      expect(band(primary)).toBeLessThan(1e-3 * maxOf(primary));
      // Reflection and transmission light the band in the whole drop: the primary layer is far darker there.
      expect(band(primary)).toBeLessThan(0.05 * wholeBandMin);
    });
  }

  it("order rows have their own cache variant, never the whole row's", () => {
    expect(orderVariant("mie", undefined)).toBe("mie");
    expect(new Set([undefined, 0, 1, 2, 3].map((p) => orderVariant("mie~4x0.05", p))).size).toBe(5);
    const rows = (order?: number) => kernelRows({ medium: MEDIUM, h: 0.05, items: [{ radiusUm: 300, engine: "airy", blocks: [0] }], ...(order === undefined ? {} : { order }) }).rows[0][0];
    expect(rows(2)).not.toEqual(rows());
    expect(() => kernelRows({ medium: MEDIUM, h: 0.05, items: [{ radiusUm: 2000, engine: "airy", blocks: [0], shape: { kind: "spheroid", axisRatio: 0.9 } as never }], order: 2 })).toThrow(/spheres only/);
  });
});
