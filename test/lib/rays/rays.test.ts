import { describe, expect, it } from "vitest";
import { airyBowIntensity } from "../../../lib/rays/airy-bow.js";
import { deviationCurvature, deviationRad, descartesRay } from "../../../lib/rays/descartes.js";
import { fresnelAmplitudes, fresnelReflectance } from "../../../lib/rays/fresnel.js";
import { geometricIntensity, raysAtScatteringAngle } from "../../../lib/rays/geometric-intensity.js";
import { waterIndex } from "../../../lib/water/water-index.js";

const DEG = Math.PI / 180;

describe("Descartes rainbow rays (computed from Descartes' condition cos²i = (n²−1)/(k(k+2)), van de Hulst 1957 ch. 13; docs/checks.md)", () => {
  // [n, k, incidence°, deviation°, Θ from the sun°, d²D/db²]; angles printed to 1e-4° → tolerance 1e-4°,
  // curvature printed to 7 significant digits → 1e-6 relative.
  const rows: [number, number, number, number, number, number][] = [
    [1.3317, 1, 59.486, 137.7325, 137.7325, 9.871973],
    [1.3317, 2, 71.8847, 230.5494, 180 - 50.5494, 56.209084],
    [1.3317, 3, 76.8753, 317.7837, 42.2163, 155.960815],
    [1.3317, 4, 79.6584, 403.0909, 43.0909, 326.495983],
    [4 / 3, 1, 59.3911, 137.9703, 180 - 42.0297, 9.779642],
    [4 / 3, 2, 71.832, 230.9781, 180 - 50.9781, 55.721088],
  ];
  it.each(rows)("n = %s, k = %s", (n, k, incidence, deviation, theta, curvature) => {
    const ray = descartesRay(n, k);
    expect(Math.abs(ray.incidenceDeg - incidence)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(ray.deviationDeg - deviation)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(ray.scatteringAngleDeg - theta)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(ray.antisolarAngleDeg - (180 - theta))).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(ray.curvature / curvature - 1)).toBeLessThanOrEqual(1e-6);
  });

  it("n = 1.3330: primary ψ = 42.08°, secondary 50.89° (the issue's computed check, to the printed 0.01°)", () => {
    expect(Math.abs(descartesRay(1.333, 1).antisolarAngleDeg - 42.08)).toBeLessThanOrEqual(0.005);
    expect(Math.abs(descartesRay(1.333, 2).antisolarAngleDeg - 50.89)).toBeLessThanOrEqual(0.005);
  });

  it("the rainbow ray is stationary: D(b_R ± h) − D(b_R) ≈ D″h²/2 (finite differences)", () => {
    const ray = descartesRay(1.3317, 1);
    const h = 1e-4;
    const d0 = deviationRad(1.3317, 1, ray.impactParameter);
    const up = deviationRad(1.3317, 1, ray.impactParameter + h) - d0;
    const down = deviationRad(1.3317, 1, ray.impactParameter - h) - d0;
    expect(Math.abs(up - down)).toBeLessThan(1e-10);
    expect(Math.abs((up + down) / (h * h) / deviationCurvature(1.3317, 1, ray.impactParameter) - 1)).toBeLessThan(1e-6);
  });

  // Per-wavelength bows, water at 20 °C from R9-97 (computed: docs/checks.md). Our n uses the Kell density
  // (≤ 2e-6 off) and the table's n is rounded to 6 decimals: 0.002° covers both (dψ/dn ≈ 140° per unit n).
  const bows: [number, number, number, number][] = [
    [400, 40.567, 53.621, 13.054],
    [450, 41.127, 52.608, 11.481],
    [500, 41.529, 51.88, 10.351],
    [550, 41.834, 51.331, 9.497],
    [600, 42.075, 50.897, 8.822],
    [650, 42.272, 50.541, 8.269],
    [700, 42.44, 50.238, 7.798],
  ];
  it.each(bows)("λ = %s nm at 20 °C: primary %s°, secondary %s°, Alexander's band %s°", (lambda, primary, secondary, band) => {
    const { n } = waterIndex({ wavelengthNm: lambda, temperatureC: 20, salinityPsu: 0 });
    const first = descartesRay(n, 1).antisolarAngleDeg;
    const second = descartesRay(n, 2).antisolarAngleDeg;
    expect(Math.abs(first - primary)).toBeLessThanOrEqual(0.002);
    expect(Math.abs(second - secondary)).toBeLessThanOrEqual(0.002);
    expect(Math.abs(second - first - band)).toBeLessThanOrEqual(0.002);
  });
});

// Scattering angle of the main maximum of the Airy bow: coarse scan, then golden-section refinement.
function airyPeakDeg(n: number, x: number, k: number): number {
  const intensity = (thetaDeg: number) => airyBowIntensity(n, x, k, new Float64Array([thetaDeg])).perpendicular[0];
  const centre = descartesRay(n, k).scatteringAngleDeg;
  const step = 0.005;
  let best = centre;
  for (let t = centre - 10; t <= centre + 10; t += step) if (intensity(t) > intensity(best)) best = t;
  let lo = best - step;
  let hi = best + step;
  const g = (Math.sqrt(5) - 1) / 2;
  for (let i = 0; i < 80; i++) {
    const a = hi - g * (hi - lo);
    const b = lo + g * (hi - lo);
    if (intensity(a) > intensity(b)) hi = b;
    else lo = a;
  }
  return 0.5 * (lo + hi);
}

describe("Airy theory of the bow", () => {
  // Main-maximum displacement Δθ = 1.01879·(D″/2)^(1/3)·x^(−2/3) at 550 nm, n = 1.334683 (Airy 1838;
  // computed: docs/checks.md); printed to 0.001° → tolerance 0.0006°.
  const displacements: [number, number, number][] = [
    [10, 4.197, 7.498],
    [25, 2.279, 4.071],
    [50, 1.436, 2.564],
    [100, 0.904, 1.615],
    [250, 0.491, 0.877],
    [500, 0.309, 0.553],
    [1000, 0.195, 0.348],
  ];
  it.each(displacements)("radius %s µm: primary Δθ %s°, secondary Δθ %s°", (radiusUm, primary, secondary) => {
    const n = 1.334683;
    const x = (2 * Math.PI * radiusUm) / 0.55;
    const dPrimary = airyPeakDeg(n, x, 1) - descartesRay(n, 1).scatteringAngleDeg;
    const dSecondary = airyPeakDeg(n, x, 2) - descartesRay(n, 2).scatteringAngleDeg;
    // The primary's maximum lies at larger Θ (inside the bow), the secondary's at smaller Θ (outside).
    expect(Math.abs(dPrimary - primary)).toBeLessThanOrEqual(6e-4);
    expect(Math.abs(-dSecondary - secondary)).toBeLessThanOrEqual(6e-4);
  });

  // "Airy prediction" column of the Airy-vs-Mie cross-check, n = 1.3317 (computed: docs/checks.md): 1e-3°.
  it.each([
    [1000, 138.726],
    [3000, 138.21],
    [10000, 137.947],
  ])("x = %s: primary maximum at %s°", (x, theta) => {
    expect(Math.abs(airyPeakDeg(1.3317, x, 1) - theta)).toBeLessThanOrEqual(1e-3);
  });

  it("peak value: |S1|² at ξ = −a'_1 equals C·Ai(a'_1)² with Ai(a'_1)² = 0.2869280531 (A&S Table 10.13)", () => {
    const n = 1.3317;
    const x = 10000;
    const peak = airyPeakDeg(n, x, 1);
    const value = airyBowIntensity(n, x, 1, new Float64Array([peak])).perpendicular[0];
    // C from the two-ray matching (derived in lib/rays/airy-bow.ts), written out independently here.
    const ray = descartesRay(n, 1);
    const b = ray.impactParameter;
    const r = fresnelReflectance(n, b).perpendicular;
    const energy = (1 - r) ** 2 * r;
    const c = (4 * Math.PI * 2 ** (-1 / 3) * x ** (7 / 3) * b * energy) / (ray.curvature ** (2 / 3) * Math.sin(ray.scatteringAngleDeg * DEG));
    expect(Math.abs(value / (c * 0.2869280531) - 1)).toBeLessThan(1e-9);
  });

  it("the dark side decays: 1° outside the primary of a 1 mm drop is below 1e-6 of the peak", () => {
    const n = 1.3317;
    const x = (2 * Math.PI * 1000) / 0.55;
    const theta = descartesRay(n, 1).scatteringAngleDeg;
    const { perpendicular } = airyBowIntensity(n, x, 1, new Float64Array([theta - 1, airyPeakDeg(n, x, 1)]));
    expect(perpendicular[0] / perpendicular[1]).toBeLessThan(1e-6);
  });
});

describe("geometric-optics intensity", () => {
  const n = 4 / 3;
  const x = 1000;
  const normalReflectance = ((n - 1) / (n + 1)) ** 2;

  // Hand derivation, external reflection at b → 0: Θ = π − 2i, so b/sinΘ → 1/2 and |db/dΘ| → 1/2, giving
  // |S|² = x²·R(0)/4 with R(0) = ((n−1)/(n+1))², i.e. Q_back = 4|S|²/x² = R(0), the large-sphere limit of
  // geometric-optics backscatter of a large sphere (van de Hulst 1957 ch. 12, from memory).
  it("k = −1 at Θ = 180°: |S|² = x²((n−1)/(n+1))²/4, both polarisations", () => {
    const g = geometricIntensity(n, x, -1, new Float64Array([180]));
    const want = (x * x * normalReflectance) / 4;
    expect(Math.abs(g.perpendicular[0] / want - 1)).toBeLessThan(1e-9);
    expect(Math.abs(g.parallel[0] / want - 1)).toBeLessThan(1e-9);
  });

  // Hand derivation, one internal reflection at b → 0: D ≈ π + 2b(1 − 2/n), so |dΘ/db| = 2(2 − n)/n and
  // b/sinΘ → n/(2(2 − n)); ε² = (1 − R)²R with R = R(0): |S|² = x²(1 − R)²R·(n/(2(2 − n)))².
  it("k = 1 at Θ = 180°: |S|² = x²(1−R)²R·(n/(2(2−n)))²", () => {
    const g = geometricIntensity(n, x, 1, new Float64Array([180]));
    const want = x * x * (1 - normalReflectance) ** 2 * normalReflectance * (n / (2 * (2 - n))) ** 2;
    expect(Math.abs(g.perpendicular[0] / want - 1)).toBeLessThan(1e-6);
    expect(Math.abs(g.parallel[0] / want - 1)).toBeLessThan(1e-6);
  });

  // Hand derivation for a ray with b = 0.2 (a single-ray region for n = 4/3: D(0.2) = 168.5° > D(1) = 165.6°):
  // i = asin 0.2, r = asin(0.2/n), Θ = D = 2i − 4r + π (< π here); |dΘ/db| = 4/(n cos r) − 2/cos i;
  // |S_j|² = x²·(1 − R_j)²R_j·b/(|dΘ/db|·sinΘ) with R_j the Fresnel reflectances at i.
  it("k = 1 at the angle of the b = 0.2 ray matches the closed form", () => {
    const b = 0.2;
    const i = Math.asin(b);
    const r = Math.asin(b / n);
    const theta = 2 * i - 4 * r + Math.PI;
    const slope = 4 / (n * Math.cos(r)) - 2 / Math.cos(i);
    const rPerp = ((Math.cos(i) - n * Math.cos(r)) / (Math.cos(i) + n * Math.cos(r))) ** 2;
    const rPar = ((n * Math.cos(i) - Math.cos(r)) / (n * Math.cos(i) + Math.cos(r))) ** 2;
    const spread = (x * x * b) / (slope * Math.sin(theta));
    const g = geometricIntensity(n, x, 1, new Float64Array([theta / DEG]));
    expect(raysAtScatteringAngle(n, 1, theta)).toHaveLength(1);
    expect(Math.abs(g.perpendicular[0] / (spread * (1 - rPerp) ** 2 * rPerp) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(g.parallel[0] / (spread * (1 - rPar) ** 2 * rPar) - 1)).toBeLessThan(1e-9);
  });

  it("two rays on the lit side of the primary, none on the dark side", () => {
    const theta = descartesRay(n, 1).scatteringAngleDeg;
    expect(raysAtScatteringAngle(n, 1, (theta + 1) * DEG)).toHaveLength(2);
    expect(raysAtScatteringAngle(n, 1, (theta - 1) * DEG)).toHaveLength(0);
    const secondary = descartesRay(n, 2).scatteringAngleDeg;
    expect(raysAtScatteringAngle(n, 2, (secondary - 1) * DEG)).toHaveLength(2);
    expect(raysAtScatteringAngle(n, 2, (secondary + 1) * DEG)).toHaveLength(0);
    // Tertiary: D falls from 3π (b = 0) through 2π to D_R ≈ 318° and rises to ≈ 331° (b = 1), so besides the two
    // bow rays on the lit side (smaller Θ) one ray with D between 2π and 3π reaches every Θ.
    const tertiary = descartesRay(n, 3);
    expect(tertiary.scatteringSign).toBe(-1);
    expect(raysAtScatteringAngle(n, 3, (tertiary.scatteringAngleDeg - 1) * DEG)).toHaveLength(3);
    expect(raysAtScatteringAngle(n, 3, (tertiary.scatteringAngleDeg + 1) * DEG)).toHaveLength(1);
  });

  // Born & Wolf 1999 §1.5.2 Eq. 21: r⊥ = −sin(i − t)/sin(i + t), r∥ = tan(i − t)/tan(i + t), so at normal incidence
  // r⊥ = (1 − n)/(1 + n) and r∥ = (n − 1)/(n + 1); r∥ vanishes at Brewster's angle, tan i = n (§1.5.3).
  it("signed amplitudes: ∓(n − 1)/(n + 1) at normal incidence, r∥ = 0 at Brewster's angle", () => {
    const normal = fresnelAmplitudes(n, 0);
    expect(normal.perpendicular).toBeCloseTo((1 - n) / (1 + n), 15);
    expect(normal.parallel).toBeCloseTo((n - 1) / (n + 1), 15);
    const brewster = fresnelAmplitudes(n, Math.sin(Math.atan(n)));
    expect(Math.abs(brewster.parallel)).toBeLessThan(1e-15);
    expect(brewster.perpendicular).toBeLessThan(0);
    expect(fresnelReflectance(n, 0.3).perpendicular).toBe(fresnelAmplitudes(n, 0.3).perpendicular ** 2);
  });

  // Fresnel: energy is conserved over all orders, R + (1 − R)² Σ R^(p−1) = 1 (van de Hulst 1957 §12.21).
  it("the path factors of all orders sum to 1 for each polarisation", () => {
    const b = 0.7;
    const r = fresnelReflectance(n, b);
    for (const reflectance of [r.perpendicular, r.parallel]) {
      let total = reflectance;
      for (let k = 0; k < 200; k++) total += (1 - reflectance) ** 2 * reflectance ** k;
      expect(Math.abs(total - 1)).toBeLessThan(1e-12);
    }
  });
});

// Lit side far from the bow: the Airy curve's local mean must tend to the two-ray geometric sum, as its
// normalisation demands. The mean is a Hann-weighted average of the ratio Airy/geometric over ±6 fringes around ξ
// (a smooth window, so the fringes leave no residue); what remains is the O(Θ − Θ_R) error of the cubic-wavefront
// approximation, so the tests use large x, where ξ = 20–50 lies close to the bow.
function litSideRatio(n: number, x: number, k: number, xi: number): number {
  const ray = descartesRay(n, k);
  const perRadian = Math.cbrt(2 / ray.curvature) * x ** (2 / 3);
  const phase = (z: number) => (4 / 3) * z ** 1.5;
  const fringes = 6;
  const xiLow = ((phase(xi) - fringes * Math.PI) * 0.75) ** (2 / 3);
  const xiHigh = ((phase(xi) + fringes * Math.PI) * 0.75) ** (2 / 3);
  const samples = 3000;
  const angles = new Float64Array(samples + 1);
  for (let j = 0; j <= samples; j++) {
    const z = xiLow + ((xiHigh - xiLow) * j) / samples;
    angles[j] = ray.scatteringAngleDeg + (ray.scatteringSign * z) / perRadian / DEG;
  }
  const airy = airyBowIntensity(n, x, k, angles).perpendicular;
  const geometric = geometricIntensity(n, x, k, angles).perpendicular;
  let weighted = 0;
  let weights = 0;
  for (let j = 0; j <= samples; j++) {
    const w = Math.sin((Math.PI * j) / samples) ** 2;
    weighted += (w * airy[j]) / geometric[j];
    weights += w;
  }
  return weighted / weights;
}

describe("Airy intensity tends to the geometric two-ray sum on the lit side", () => {
  it.each([20, 35, 50])("ξ = %s: within 0.5 % for x = 1e8 (k = 1, 2)", (xi) => {
    expect(Math.abs(litSideRatio(1.3317, 1e8, 1, xi) - 1)).toBeLessThan(0.005);
    expect(Math.abs(litSideRatio(1.3317, 1e8, 2, xi) - 1)).toBeLessThan(0.005);
  });
  it("the residual shrinks like x^(−2/3) (the angular distance of fixed ξ from the bow)", () => {
    const at1e6 = litSideRatio(1.3317, 1e6, 1, 35) - 1;
    const at1e7 = litSideRatio(1.3317, 1e7, 1, 35) - 1;
    expect(Math.abs(at1e6)).toBeLessThan(0.03);
    expect(at1e6 / at1e7).toBeGreaterThan(10 ** (2 / 3) * 0.6);
    expect(at1e6 / at1e7).toBeLessThan(10 ** (2 / 3) * 1.6);
  });
});
