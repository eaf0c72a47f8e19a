import { describe, expect, it } from "vitest";
import { EclipticGeoMoon } from "astronomy-engine";
import { MOON_MEAN_DISTANCE_KM, lunarReflectance, moonAngularDiameterDeg, moonIlluminanceLux, moonlight } from "../../../lib/sky/moonlight.js";
import { moonPhase, sourcePosition } from "../../../lib/sky/source-position.js";

describe("the moon's position", () => {
  it("matches Meeus's worked example 47.a within 0.05° (Meeus 1998, Astronomical Algorithms, 2nd ed., Example 47.a; values from memory)", () => {
    // 1992 April 12, 0h TD (ΔT ≈ 59 s, so 23:59:01 UT on the 11th): λ = 133.162655°, β = −3.229126°, Δ = 368 409.7 km.
    const moon = EclipticGeoMoon(new Date(Date.UTC(1992, 3, 11, 23, 59, 1)));
    expect(Math.abs(moon.lon - 133.162655)).toBeLessThan(0.05);
    expect(Math.abs(moon.lat - -3.229126)).toBeLessThan(0.05);
    // 0.05 % of the distance: about the disc's size to 0.0003°.
    expect(Math.abs(moon.dist * 149597870.7 - 368409.7) / 368409.7).toBeLessThan(5e-4);
  });

  it("is a topocentric position: the parallax lowers the moon by up to about 0.95° (Meeus 1998, ch. 40, from memory)", () => {
    const at = { utcMs: Date.UTC(1992, 3, 12, 0, 0, 0), latitudeDeg: 0, longitudeDeg: 0 };
    const p = sourcePosition("moon", at);
    expect(p.distanceKm).toBeGreaterThan(356000);
    expect(p.distanceKm).toBeLessThan(407000);
    expect(moonPhase(at.utcMs).phaseAngleDeg).toBeGreaterThan(0);
  });
});

describe("moonlight", () => {
  it("gives Krisciunas & Schaefer's full-moon illuminance, 0.313 lux at mean distance (K&S 1991, PASP 103, 1033, eqs. 8–9)", () => {
    // m = −12.73 → 10^(−0.4·3.84) fc = 0.029107 fc = 0.31331 lx.
    expect(moonIlluminanceLux(0)).toBeCloseTo(0.31331, 4);
    // Quarter moon (α = 90°): m = −12.73 + 0.026·90 + 4e-9·90⁴ = −12.73 + 2.34 + 0.26244, 11 times fainter.
    expect(moonIlluminanceLux(0) / moonIlluminanceLux(90)).toBeCloseTo(10 ** (0.4 * 2.60244), 6);
    // Perigee (356 500 km) is brighter by the inverse-square law.
    expect(moonIlluminanceLux(0, 356500) / moonIlluminanceLux(0)).toBeCloseTo((MOON_MEAN_DISTANCE_KM / 356500) ** 2, 10);
  });

  it("has a disc of 0.518° at mean distance (2·asin(1737.4/384400))", () => {
    expect(moonAngularDiameterDeg(MOON_MEAN_DISTANCE_KM)).toBeCloseTo(0.51796, 4);
  });

  it("is redder than sunlight: the ROLO reflectance rises from blue to red (Kieffer & Stone 2005, Table 4)", () => {
    expect(lunarReflectance(700, 7) / lunarReflectance(450, 7)).toBeGreaterThan(1.3);
    expect(lunarReflectance(700, 7) / lunarReflectance(450, 7)).toBeLessThan(1.7);
  });

  it("the reflectance model alone gives K&S's illuminance within 10 % from 7° to 90° of phase (Kieffer & Stone 2005, eq. 8)", () => {
    // Two independent published models: ROLO's absolute scale (A Ω E☉/π with ASTM G173 sunlight) and K&S's
    // photometry, which its authors give to 8–23 %. Measured: 7° +2.7 %, 30° −2.9 %, 90° −0.2 %. Nearer full, ROLO
    // has the opposition surge K&S leave out (0°: 0.43 against 0.31 lux).
    for (const phaseDeg of [7, 30, 90]) {
      const m = moonlight(phaseDeg);
      expect(Math.abs(m.reflectanceModelLux / m.illuminanceLux - 1), `${phaseDeg}°`).toBeLessThan(0.1);
    }
  });
});
