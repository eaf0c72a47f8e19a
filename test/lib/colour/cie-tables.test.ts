import { describe, it, expect } from "vitest";
import { cieXyz1931TwoDeg } from "../../../lib/data/cie-xyz-1931-2deg.js";
import { cieXyz1964TenDeg } from "../../../lib/data/cie-xyz-1964-10deg.js";
import { cieIlluminantD65 } from "../../../lib/data/cie-illuminant-d65.js";
import { cieDaylightComponents } from "../../../lib/data/cie-daylight-components.js";
import { chromaticities, cmfTables, chromaticity, spectraToXyz, spectrumToXyz, type Observer } from "../../../lib/colour/index.js";
import { makeWavelengthGrid, interpolateAt, type Spectrum } from "../../../lib/spectra/index.js";
import { d65Spectrum } from "../../../lib/sun/index.js";

const sum = (a: Float64Array) => a.reduce((s, v) => s + (Number.isNaN(v) ? 0 : v), 0);

describe("generated CIE tables against the CIE dataset metadata (CIE 2019 data sets 10.25039/CIE.DS.xvudnb9b, .sqksu2n5, .hjfjmt59; published sums and sample rows)", () => {
  // Sums of ~471 numbers with ≤ 13 significant digits: 1e-9 absolute allows double round-off only.
  it("CIE 1931 2° column sums equal CIE's sumOfColumns", () => {
    const c = cieXyz1931TwoDeg.columns;
    expect(sum(c.xBar)).toBeCloseTo(106.865469489595, 9);
    expect(sum(c.yBar)).toBeCloseTo(106.8569171011719, 9);
    expect(sum(c.zBar)).toBeCloseTo(106.892251278636, 9);
    expect(cieXyz1931TwoDeg.startNm).toBe(360);
    expect(cieXyz1931TwoDeg.count).toBe(471);
  });
  it("CIE 1964 10° column sums (NaN z̄10 counted as 0) equal CIE's sumOfColumns", () => {
    const c = cieXyz1964TenDeg.columns;
    expect(sum(c.xBar)).toBeCloseTo(116.648519508908, 9);
    expect(sum(c.yBar)).toBeCloseTo(116.661877102312, 9);
    expect(sum(c.zBar)).toBeCloseTo(116.673980514647, 9);
  });
  it("D65 and S0 S1 S2 column sums (CIE metadata)", () => {
    expect(sum(cieIlluminantD65.columns.relative)).toBeCloseTo(40852.204, 6);
    expect(sum(cieDaylightComponents.columns.s0)).toBeCloseTo(8715.51, 6);
    expect(sum(cieDaylightComponents.columns.s1)).toBeCloseTo(890.13, 6);
    expect(sum(cieDaylightComponents.columns.s2)).toBeCloseTo(374.95, 6);
  });
  it("spot values: ȳ(555) = 1, x̄(600) = 1.0622, z̄(445) = 1.7826, row 479 nm; 1964 rows 479, 579 (z̄10 → 0)", () => {
    const t = cmfTables("cie1931-2");
    expect(interpolateAt(t.yBar, 555)).toBe(1);
    expect(interpolateAt(t.xBar, 600)).toBe(1.0622);
    expect(interpolateAt(t.zBar, 445)).toBe(1.7826);
    expect([interpolateAt(t.xBar, 479), interpolateAt(t.yBar, 479), interpolateAt(t.zBar, 479)]).toEqual([0.1042979, 0.1334528, 0.8566193]);
    const t10 = cmfTables("cie1964-10");
    expect([interpolateAt(t10.xBar, 479), interpolateAt(t10.yBar, 479), interpolateAt(t10.zBar, 479)]).toEqual([0.089388, 0.245997, 0.81828]);
    expect([interpolateAt(t10.xBar, 579), interpolateAt(t10.yBar, 579), interpolateAt(t10.zBar, 579)]).toEqual([1.00191, 0.877986, 0]);
    expect(interpolateAt(t10.yBar, 557)).toBe(1);
  });
});

describe("spectrum locus (computed from the CIE 2019 1 nm data sets, as CIE's own 10.25039/CIE.DS.mifmy4x4; 5-decimal rounding → tolerance 5e-6)", () => {
  const rows: [number, number, number, number, number][] = [
    [400, 0.17334, 0.0048, 0.17839, 0.01871], [450, 0.15664, 0.0177, 0.151, 0.03644], [500, 0.00817, 0.53842, 0.00559, 0.67454],
    [520, 0.0743, 0.8338, 0.12524, 0.81019], [550, 0.3016, 0.69231, 0.3473, 0.65009], [580, 0.51249, 0.48659, 0.53856, 0.46144],
    [600, 0.62704, 0.37249, 0.63063, 0.36937], [620, 0.6915, 0.30834, 0.68266, 0.31734], [700, 0.73469, 0.26531, 0.72036, 0.27964],
  ];
  const locus = (observer: Observer, w: number) => {
    const t = cmfTables(observer);
    return chromaticity({ X: interpolateAt(t.xBar, w), Y: interpolateAt(t.yBar, w), Z: interpolateAt(t.zBar, w) });
  };
  for (const [w, x2, y2, x10, y10] of rows) {
    it(`${w} nm`, () => {
      const a = locus("cie1931-2", w);
      const b = locus("cie1964-10", w);
      expect(Math.abs(a.x - x2)).toBeLessThan(5e-6);
      expect(Math.abs(a.y - y2)).toBeLessThan(5e-6);
      expect(Math.abs(b.x - x10)).toBeLessThan(5e-6);
      expect(Math.abs(b.y - y10)).toBeLessThan(5e-6);
    });
  }
});

function normalisedXyz(s: Spectrum, observer: Observer) {
  const xyz = spectrumToXyz(s, observer);
  return { X: (100 * xyz.X) / xyz.Y, Y: 100, Z: (100 * xyz.Z) / xyz.Y, ...chromaticity(xyz) };
}

describe("white points by the CIE 015:2018 §7 sum", () => {
  // The computed figures (docs/checks.md; CIE 015:2018 publishes 0.31272, 0.32903 for the 5 nm sum) are given to
  // 6 decimals (x, y) and 4 decimals (XYZ): tolerances are half a unit.
  it("D65, 2°, 1 nm 360–830: x, y = 0.312727, 0.329023; XYZ = 95.0471, 100, 108.8829 (computed)", () => {
    const w = normalisedXyz(d65Spectrum(makeWavelengthGrid(360, 830, 1)), "cie1931-2");
    expect(Math.abs(w.x - 0.312727)).toBeLessThan(5e-7);
    expect(Math.abs(w.y - 0.329023)).toBeLessThan(5e-7);
    expect(Math.abs(w.X - 95.0471)).toBeLessThan(5e-5);
    expect(Math.abs(w.Z - 108.8829)).toBeLessThan(5e-5);
  });
  it("D65, 2°, 5 nm 380–780: x, y = 0.31272, 0.32903 (CIE 015, published, 5 decimals) and XYZ 95.0430, 108.8801 (computed)", () => {
    const w = normalisedXyz(d65Spectrum(makeWavelengthGrid(380, 780, 5)), "cie1931-2");
    expect(Math.abs(w.x - 0.31272)).toBeLessThan(5e-6);
    expect(Math.abs(w.y - 0.32903)).toBeLessThan(5e-6);
    expect(Math.abs(w.X - 95.043)).toBeLessThan(5e-5);
    expect(Math.abs(w.Z - 108.8801)).toBeLessThan(5e-5);
  });
  it("D65, 10°, 1 nm: x, y = 0.313824, 0.330999; XYZ 94.8111, 107.3047 (computed); 5 nm 380–780: 0.313805, 0.330977", () => {
    const w = normalisedXyz(d65Spectrum(makeWavelengthGrid(360, 830, 1)), "cie1964-10");
    expect(Math.abs(w.x - 0.313824)).toBeLessThan(5e-7);
    expect(Math.abs(w.y - 0.330999)).toBeLessThan(5e-7);
    expect(Math.abs(w.X - 94.8111)).toBeLessThan(5e-5);
    expect(Math.abs(w.Z - 107.3047)).toBeLessThan(5e-5);
    // CIE 015 publishes 0.31382, 0.33100; the 1 nm sum agrees within 2 units of the 5th decimal.
    expect(Math.abs(w.x - 0.31382)).toBeLessThan(2e-5);
    expect(Math.abs(w.y - 0.331)).toBeLessThan(2e-5);
    const w5 = normalisedXyz(d65Spectrum(makeWavelengthGrid(380, 780, 5)), "cie1964-10");
    expect(Math.abs(w5.x - 0.313805)).toBeLessThan(5e-7);
    expect(Math.abs(w5.y - 0.330977)).toBeLessThan(5e-7);
  });
  it("equal-energy white, 2°, 1 nm: x, y = 0.333314, 0.333288 (computed; 1/3 by construction within 5e-5)", () => {
    const grid = makeWavelengthGrid(360, 830, 1);
    const w = normalisedXyz({ grid, values: new Float64Array(grid.count).fill(1) }, "cie1931-2");
    expect(Math.abs(w.x - 0.333314)).toBeLessThan(5e-7);
    expect(Math.abs(w.y - 0.333288)).toBeLessThan(5e-7);
    expect(Math.abs(w.x - 1 / 3)).toBeLessThan(5e-5);
  });
  it("the batched sum over many spectra equals the single-spectrum sum (1e-12 relative: same arithmetic order)", () => {
    const grid = makeWavelengthGrid(380, 780, 5);
    const d65 = d65Spectrum(grid).values;
    const batch = new Float64Array(2 * grid.count);
    batch.set(d65, 0);
    batch.set(d65.map((v, i) => v * (i % 3)), grid.count);
    const xyz = spectraToXyz(grid, batch, "cie1964-10");
    const one = spectrumToXyz({ grid, values: batch.subarray(grid.count) }, "cie1964-10");
    expect(Math.abs(xyz[3] / one.X - 1)).toBeLessThan(1e-12);
    expect(Math.abs(xyz[5] / one.Z - 1)).toBeLessThan(1e-12);
    expect(Math.abs(chromaticities(xyz)[0] - 0.313805)).toBeLessThan(5e-7);
  });
  it("rejects grids outside the CMF table rather than extrapolating", () => {
    const grid = makeWavelengthGrid(350, 800, 5);
    expect(() => spectrumToXyz({ grid, values: new Float64Array(grid.count).fill(1) }, "cie1931-2")).toThrow(RangeError);
  });
});
