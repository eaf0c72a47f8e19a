// The moon as the light: a `moon` object becomes the sun-shaped light every render already takes (a tabulated
// spectrum above the atmosphere, the moon's disc, no limb darkening), with its position resolved.

import { moonlight } from "../../lib/sky/moonlight.js";
import { moonPhase } from "../../lib/sky/source-position.js";
import type { MoonInput } from "../../schemas/moon.js";
import type { ProfileRequest } from "../../schemas/profile.js";
import { NO_LIGHT, positionAt, type SourcePositionMeta } from "./source-position.js";

export const MOONLIGHT_SOURCES = [
  "Krisciunas & Schaefer 1991 (PASP 103, 1033) moon brightness by phase",
  "Kieffer & Stone 2005 (Astron. J. 129, 2887) ROLO lunar reflectance for the spectrum",
];

export interface MoonlightMeta {
  phaseAngleDeg: number;
  distanceKm: number;
  discDeg: number;
  /** Above the atmosphere, on a surface facing the moon. */
  illuminanceLux: number;
  spectrum: string;
  sources: string[];
}

export interface MoonAsSun {
  sun: ProfileRequest["sun"];
  azimuthDeg?: number;
  sourcePosition?: SourcePositionMeta;
  moonlight: MoonlightMeta;
  warnings: string[];
}

const round = (v: number) => Number(v.toPrecision(6));

/** The moon (`field` names it in the request, for errors) as a sun-shaped light. */
export function moonAsSun(moon: MoonInput & { azimuthDeg?: number }, field: string): MoonAsSun {
  let elevationDeg = moon.elevationDeg;
  let azimuthDeg = moon.azimuthDeg;
  let phaseAngleDeg = moon.phaseAngleDeg;
  let distanceKm = moon.distanceKm;
  let sourcePosition: SourcePositionMeta | undefined;
  let dark = false;
  const warnings: string[] = [];
  if (moon.at) {
    const p = positionAt("moon", moon.at, field);
    ({ elevationDeg, azimuthDeg, dark } = p);
    sourcePosition = p.meta;
    warnings.push(...p.warnings);
    phaseAngleDeg = moonPhase(Date.parse(moon.at.utc)).phaseAngleDeg;
    distanceKm = p.meta.distanceKm;
  }
  const light = moonlight(phaseAngleDeg, distanceKm);
  const spectrum = dark ? NO_LIGHT : { kind: "table" as const, wavelengthsNm: Array.from(light.wavelengthsNm), values: Array.from(light.irradiance) };
  // Moonlight is computed above the atmosphere: "auto" attenuates it, as it does the sun's extraterrestrial spectrum.
  const atmosphere = { ...moon.atmosphere, attenuate: moon.atmosphere.attenuate === "auto" ? ("always" as const) : moon.atmosphere.attenuate };
  return {
    // The full moon's disc is nearly uniformly bright (no limb darkening worth modelling; common practice).
    sun: { spectrum, elevationDeg, atmosphere, discDeg: light.discDeg, limbDarkening: "uniform" },
    azimuthDeg,
    sourcePosition,
    moonlight: {
      phaseAngleDeg: round(phaseAngleDeg),
      distanceKm: Math.round(distanceKm),
      discDeg: round(light.discDeg),
      illuminanceLux: round(light.illuminanceLux),
      spectrum: "ASTM G173-03 extraterrestrial sunlight × the ROLO reflectance's spectral shape at this phase, scaled to the Krisciunas & Schaefer illuminance; W m⁻² nm⁻¹ above the atmosphere, 360–830 nm",
      sources: MOONLIGHT_SOURCES,
    },
    warnings,
  };
}
