import { describe, expect, it } from "vitest";
import { REQUEST_WAVELENGTHS_NM, WATER_INDEX_RANGE, waterIndexSpan } from "../../../lib/water/index-range.js";
import { waterIndex } from "../../../lib/water/water-index.js";
import { profileRequestSchema } from "../../../schemas/profile.js";

describe("the span of water's index over the service's inputs", () => {
  it("holds every index IAPWS R9-97 (with Quan & Fry 1995 salt) gives at 360–830 nm, −10–100 °C, 0–35 PSU, and its ends are reached within 1e-4", () => {
    // The service's limits themselves: the extreme requests are accepted.
    expect(() => profileRequestSchema.parse({ spectral: { fromNm: 360, toNm: 830, stepNm: 10 }, water: { temperatureC: -10, salinityPsu: 0 } })).not.toThrow();
    expect(() => profileRequestSchema.parse({ spectral: { fromNm: 360, toNm: 830, stepNm: 10 }, water: { temperatureC: 100, salinityPsu: 0 } })).not.toThrow();
    expect(() => profileRequestSchema.parse({ spectral: { fromNm: 350, toNm: 830, stepNm: 10 } })).toThrow();
    expect(() => profileRequestSchema.parse({ spectral: { fromNm: 360, toNm: 840, stepNm: 10 } })).toThrow();
    let lo = Infinity;
    let hi = -Infinity;
    for (let temperatureC = -10; temperatureC <= 100; temperatureC += 2) {
      for (const salinityPsu of [0, 35]) {
        for (let wavelengthNm = 360; wavelengthNm <= 830; wavelengthNm += 5) {
          if (salinityPsu > 0 && (wavelengthNm < 400 || wavelengthNm > 700)) continue;
          const n = waterIndex({ wavelengthNm, temperatureC, salinityPsu }).nRelativeToAir;
          lo = Math.min(lo, n);
          hi = Math.max(hi, n);
        }
      }
    }
    expect(lo).toBeGreaterThanOrEqual(WATER_INDEX_RANGE.min);
    expect(hi).toBeLessThanOrEqual(WATER_INDEX_RANGE.max);
    expect(lo - WATER_INDEX_RANGE.min).toBeLessThan(1e-4);
    expect(WATER_INDEX_RANGE.max - hi).toBeLessThan(1e-4);
  });

  it("one water's span covers every wavelength a request may ask for, its ends reached (the scan checks the dispersion is normal there)", () => {
    // The limits the span assumes are the schema's: salt water only at 400–700 nm.
    const { fresh, salt } = REQUEST_WAVELENGTHS_NM;
    expect(() => profileRequestSchema.parse({ spectral: { fromNm: fresh.min, toNm: fresh.max, stepNm: 10 } })).not.toThrow();
    expect(() => profileRequestSchema.parse({ spectral: { fromNm: salt.min - 10, toNm: salt.max, stepNm: 10 }, water: { temperatureC: 15, salinityPsu: 10 } })).toThrow();
    expect(() => profileRequestSchema.parse({ spectral: { fromNm: salt.min, toNm: salt.max + 10, stepNm: 10 }, water: { temperatureC: 15, salinityPsu: 10 } })).toThrow();
    for (const water of [{ temperatureC: -10, salinityPsu: 0 }, { temperatureC: 15, salinityPsu: 0 }, { temperatureC: 100, salinityPsu: 0 }, { temperatureC: 25, salinityPsu: 35 }]) {
      const span = waterIndexSpan(water);
      const range = water.salinityPsu > 0 ? salt : fresh;
      let lo = Infinity;
      let hi = -Infinity;
      for (let wavelengthNm = range.min; wavelengthNm <= range.max; wavelengthNm += 1) {
        const n = waterIndex({ wavelengthNm, ...water }).nRelativeToAir;
        lo = Math.min(lo, n);
        hi = Math.max(hi, n);
      }
      expect(lo).toBe(span.min);
      expect(hi).toBe(span.max);
      expect(span.min).toBeGreaterThanOrEqual(WATER_INDEX_RANGE.min);
      expect(span.max).toBeLessThanOrEqual(WATER_INDEX_RANGE.max);
    }
    // Fresh water at 15 °C (the default): about half the span of every water the service accepts.
    const usual = waterIndexSpan({ temperatureC: 15, salinityPsu: 0 });
    expect(usual.max - usual.min).toBeGreaterThan(0.019);
    expect(usual.max - usual.min).toBeLessThan(0.021);
  });
});
