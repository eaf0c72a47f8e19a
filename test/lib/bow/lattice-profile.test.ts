// The spectral sum per unit sunlight: computing a subset of the output angles gives those angles' values to the
// bit (each depends only on its own lattice neighbourhood), and the sunlight enters linearly per wavelength.
import { describe, it, expect } from "vitest";
import { latticeUnitProfile, latticeUnitProfilePass, sunlitProfile, discKernels, polarisedUnitRadiance } from "../../../lib/bow/lattice-profile.js";
import { sunlitXyzWeights, weightedXyz, colourProfile } from "../../../lib/bow/colour-profile.js";
import { makeWavelengthGrid } from "../../../lib/spectra/grid.js";
import { latticeSpan } from "../../../lib/bow/kernel-grid.js";

const grid = makeWavelengthGrid(400, 700, 50);
const h = 0.01;
const angles = { fromDeg: 0.1, stepDeg: 0.03, count: 200 };
// Starts at ψ = 0.1° − disc: the mirror about ψ = 0 and both ends of the span are exercised.
const span = latticeSpan(0, 0.1 + 199 * 0.03 + 0.3, h);
const n = span.last - span.first + 1;
// A smooth, wavelength-dependent stand-in for Σ w β (⊥ then ∥).
const beta = (l: number, out: Float64Array) => {
  for (let k = 0; k < n; k++) {
    out[k] = 1 + Math.sin(0.01 * k * (l + 1));
    out[n + k] = 0.5 + 0.25 * Math.cos(0.02 * k + l);
  }
};
const disc = discKernels(grid, 0.53, h, "neckel-labs-1994");

describe("latticeUnitProfile", () => {
  it("a subset of the output angles equals the full profile there, bit for bit", () => {
    const full = latticeUnitProfile({ angles, grid, span, beta, disc });
    const samples = Int32Array.of(0, 1, 2, 57, 58, 120, 198, 199);
    const part = latticeUnitProfile({ angles, grid, span, beta, disc, samples });
    const nl = grid.count;
    samples.forEach((i, s) => {
      expect(part.anglesDeg[s]).toBe(full.anglesDeg[i]);
      for (let l = 0; l < nl; l++) {
        expect(part.perpendicular[s * nl + l]).toBe(full.perpendicular[i * nl + l]);
        expect(part.parallel[s * nl + l]).toBe(full.parallel[i * nl + l]);
      }
    });
  });

  it("a pass fed its wavelengths in another order (as kernel tasks end) equals the profile in order, bit for bit", () => {
    const inOrder = latticeUnitProfile({ angles, grid, span, beta, disc });
    const pass = latticeUnitProfilePass({ angles, grid, span, disc });
    const order = [3, 0, 6, 1, 5, 2, 4];
    expect(order.sort((a, b) => a - b)).toEqual(Array.from({ length: grid.count }, (_, l) => l));
    for (const l of [3, 0, 6, 1, 5, 2, 4]) {
      expect(pass.has(l)).toBe(false);
      pass.add(l, (out) => beta(l, out));
      expect(pass.has(l)).toBe(true);
    }
    // Fed again (a request that recomputes rows tells a wavelength twice): the same column.
    pass.add(2, (out) => beta(2, out));
    const fed = pass.result();
    expect(Array.from(fed.perpendicular)).toEqual(Array.from(inOrder.perpendicular));
    expect(Array.from(fed.parallel)).toEqual(Array.from(inOrder.parallel));
  });

  it("the colour sums by per-sun weights equal colourProfile's on the lit profile to rounding", () => {
    const unit = latticeUnitProfile({ angles, grid, span, beta, disc });
    const sun = Float64Array.from({ length: grid.count }, (_, l) => 1.2 + 0.1 * l);
    const lit = sunlitProfile(unit, sun, 250);
    const reference = colourProfile(lit, grid, { observer: "cie1931-2", space: "xyz-d65", gamut: "clip", white: "absolute", normalise: "physical", sunWhite: { X: 1, Y: 1, Z: 1 } });
    const xyz = weightedXyz(polarisedUnitRadiance(unit, 1, 1), sunlitXyzWeights(grid, "cie1931-2", sun, 250));
    // Same sums in another order (the sunlight folded into the weights): a few ulps apart.
    for (let k = 0; k < xyz.length; k++) expect(Math.abs(xyz[k] - reference.xyz[k])).toBeLessThanOrEqual(1e-13 * Math.abs(reference.xyz[k]));
  });
});
