import { describe, expect, it } from "vitest";
import { sourcePosition } from "../../../lib/sky/source-position.js";
import { refractionDeg } from "../../../lib/sky/refraction.js";

describe("sun position for a place and a moment", () => {
  it("matches the NREL SPA worked example within 0.03° (Reda & Andreas 2004, NREL/TP-560-34302, Table A5.1)", () => {
    // 17 October 2003, 12:30:30 local time at UTC−7, 39.742476° N, 105.1786° W, 1830.14 m, 820 mbar, 11 °C
    // → topocentric zenith 50.11162°, azimuth 194.34024° east of north. Tolerance 0.03°: the brief's, well above
    // the difference of ΔT models (SPA uses ΔT = 67 s, about 0.004° of the sun's motion).
    const p = sourcePosition("sun", {
      utcMs: Date.UTC(2003, 9, 17, 19, 30, 30),
      latitudeDeg: 39.742476,
      longitudeDeg: -105.1786,
      heightM: 1830.14,
      pressureHpa: 820,
      temperatureC: 11,
    });
    expect(Math.abs(90 - p.elevationDeg - 50.11162)).toBeLessThan(0.03);
    expect(Math.abs(p.azimuthDeg - 194.34024)).toBeLessThan(0.03);
  });
});

describe("refraction", () => {
  it("is about 34′ at the horizon and 1′ at 45° under standard conditions (Meeus 1998, ch. 16, from memory)", () => {
    expect(refractionDeg(0) * 60).toBeGreaterThan(28);
    expect(refractionDeg(0) * 60).toBeLessThan(36);
    expect(refractionDeg(45) * 60).toBeCloseTo(1.0, 1);
  });
  it("scales with pressure and inversely with absolute temperature (Meeus 1998, ch. 16)", () => {
    expect(refractionDeg(10, 505, 10) / refractionDeg(10)).toBeCloseTo(0.5, 10);
    expect(refractionDeg(10, 1010, 10 + 283) / refractionDeg(10)).toBeCloseTo(0.5, 10);
  });
  it("is zero below the SPA's floor (Reda & Andreas 2004, eq. 42)", () => {
    expect(refractionDeg(-2)).toBe(0);
  });
});
