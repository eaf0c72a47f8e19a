import { describe, it, expect } from "vitest";
import { makeWavelengthGrid, multiplySpectra, resample, tabulated, wavelengthsNm } from "../../../lib/spectra/index.js";

describe("wavelength grid and resampling", () => {
  it("includes both ends and rejects ranges that are not whole steps", () => {
    const g = makeWavelengthGrid(380, 780, 5);
    expect(g.count).toBe(81);
    const w = wavelengthsNm(g);
    expect([w[0], w[80]]).toEqual([380, 780]);
    expect(() => makeWavelengthGrid(380, 781, 5)).toThrow(RangeError);
    expect(() => makeWavelengthGrid(380, 780, 0)).toThrow(RangeError);
  });
  it("linear interpolation is exact for a linear function and throws outside the table", () => {
    const t = tabulated([300, 350, 900], [3, 3.5, 9]);
    const s = resample(t, makeWavelengthGrid(300, 900, 7.5));
    wavelengthsNm(s.grid).forEach((w, i) => expect(s.values[i]).toBeCloseTo(w / 100, 13));
    expect(() => resample(t, makeWavelengthGrid(295, 900, 5))).toThrow(RangeError);
    expect(() => resample(t, makeWavelengthGrid(300, 905, 5))).toThrow(RangeError);
    expect(() => tabulated([400, 390], [1, 1])).toThrow(RangeError);
  });
  it("refuses to combine spectra on different grids", () => {
    const a = resample(tabulated([300, 900], [1, 1]), makeWavelengthGrid(400, 700, 10));
    const b = resample(tabulated([300, 900], [1, 1]), makeWavelengthGrid(400, 700, 5));
    expect(() => multiplySpectra(a, b)).toThrow(RangeError);
  });
});
