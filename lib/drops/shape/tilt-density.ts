// The drops' tilts seen from the sunlight: a drop's symmetry axis a, tilted from the vertical by the canting angles
// (tx, ty) of cantedAxis (lib/rays/bow-geometry.ts), is also given by the sun's elevation h′ above the drop's equator
// (sin h′ = a·(−d_in)) and the azimuth δ of a about d_in from the vertical. A drop with axis (h′, δ) scatters into the
// plane at arc position A what the upright drop, with the sun at h′, sends to A − δ (rotation invariance: a rotation
// keeps Θ and turns the scattering plane with it, so |S1|², |S2|² are kept; common practice), so the canting mean
// can be taken over (h′, δ) with the tilts' density carried over by the Jacobian of the change of variables.

const DEG = Math.PI / 180;

/** The tilts (tx, ty, degrees) of the axis at elevation h′ of the sun above the drop's equator and azimuth δ about d_in, and a_z. */
export function tiltsOf(sunElevationDeg: number, relativeElevationDeg: number, azimuthDeg: number): [number, number, number] {
  const h = sunElevationDeg * DEG;
  const e = relativeElevationDeg * DEG;
  const d = azimuthDeg * DEG;
  // a = sin h′·(−d_in) + cos h′·(cos δ·t̂ + sin δ·ŷ), t̂ = (sin h, 0, cos h) the upward unit vector ⟂ d_in (bow-geometry.ts).
  const ax = -Math.sin(e) * Math.cos(h) + Math.cos(e) * Math.cos(d) * Math.sin(h);
  const ay = Math.cos(e) * Math.sin(d);
  const az = Math.sin(e) * Math.sin(h) + Math.cos(e) * Math.cos(d) * Math.cos(h);
  return [Math.atan2(ax, az) / DEG, Math.atan2(ay, az) / DEG, az];
}

/**
 * Density of (h′, δ) per degree², from the tilts' Gaussian (σ in each of two vertical planes, Huang, Bringi & Thurai
 * 2008) and the Jacobian ∂(tx, ty)/∂(h′, δ) by central differences (Press et al. 2007, Numerical Recipes §5.7).
 */
export function tiltDensity(sunElevationDeg: number, sdDeg: number, relativeElevationDeg: number, azimuthDeg: number): number {
  const [tx, ty, az] = tiltsOf(sunElevationDeg, relativeElevationDeg, azimuthDeg);
  // Axes below the horizontal are not tilts of a falling drop.
  if (az <= 0) return 0;
  const k = 1e-4;
  const [x1, y1] = tiltsOf(sunElevationDeg, relativeElevationDeg + k, azimuthDeg);
  const [x0, y0] = tiltsOf(sunElevationDeg, relativeElevationDeg - k, azimuthDeg);
  const [x3, y3] = tiltsOf(sunElevationDeg, relativeElevationDeg, azimuthDeg + k);
  const [x2, y2] = tiltsOf(sunElevationDeg, relativeElevationDeg, azimuthDeg - k);
  const jacobian = Math.abs((x1 - x0) * (y3 - y2) - (x3 - x2) * (y1 - y0)) / (4 * k * k);
  const gauss = (t: number) => Math.exp(-(t * t) / (2 * sdDeg * sdDeg)) / (sdDeg * Math.sqrt(2 * Math.PI));
  return gauss(tx) * gauss(ty) * jacobian;
}
