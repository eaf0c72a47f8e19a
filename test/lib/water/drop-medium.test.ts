import { describe, expect, it } from "vitest";
import { dropMedia, dropMedium } from "../../../lib/water/drop-medium.js";
import { standardAirIndex } from "../../../lib/water/air-index.js";

describe("the drop's medium from the water request", () => {
  it("m relative to air at the sodium D line, 20 °C: 1.33299 (Tilton & Taylor 1938, J. Res. NBS 20, 419; volume and page from memory)", () => {
    // Refractometers read n relative to air. 2e-5: the printed value's rounding (5e-6) plus the 1.1e-5 by which
    // IAPWS R9-97 at Kell's density sits below this measurement (seen here).
    const m = dropMedium({ temperatureC: 20, salinityPsu: 0 }, 589.3);
    expect(Math.abs(m.mRe - 1.33299)).toBeLessThanOrEqual(2e-5);
    expect(m.mIm).toBe(0);
  });

  it("n_air is Ciddor's standard dry air and m·n_air is R9-97's 1.333349 at 589.3 nm, 20 °C (docs/checks.md: computed from the published formula)", () => {
    const m = dropMedium({ temperatureC: 20, salinityPsu: 0 }, 589.3);
    expect(Math.abs(m.nAir - standardAirIndex(589.3))).toBeLessThanOrEqual(1e-15);
    // As test/lib/water/water-index.test.ts: six printed decimals plus the Kell–IAPWS-95 density offset → 2e-6.
    expect(Math.abs(m.mRe * m.nAir - 1.333349)).toBeLessThanOrEqual(2e-6);
  });

  it("one medium per wavelength, the same as asking for each alone, with the water model's source", () => {
    const water = { temperatureC: 16, salinityPsu: 35 };
    const wavelengthsNm = Float64Array.of(400, 555, 700);
    const { media, source } = dropMedia(water, wavelengthsNm);
    expect(media.map((m) => m.wavelengthNm)).toEqual([400, 555, 700]);
    media.forEach((m, l) => expect(m).toEqual(dropMedium(water, wavelengthsNm[l])));
    expect(source).toMatch(/Quan & Fry 1995/);
    // Normal dispersion: the index falls with wavelength.
    expect(media[0].mRe).toBeGreaterThan(media[1].mRe);
    expect(media[1].mRe).toBeGreaterThan(media[2].mRe);
  });
});
