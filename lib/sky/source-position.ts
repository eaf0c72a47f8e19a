// Where the sun or the moon stands for an observer at a moment: airless topocentric position from the
// astronomy-engine library (Cross 2019–; VSOP87 for the sun, the Improved Lunar Ephemeris 1954 for the moon),
// then our refraction (refraction.ts).

import { Body, Equator, Horizon, Illumination, Observer } from "astronomy-engine";
import { REFRACTION_MODEL, refractionDeg } from "./refraction.js";

export type LightSource = "sun" | "moon";

export interface PlaceAndMoment {
  /** Milliseconds since 1970-01-01T00:00:00Z (UTC). */
  readonly utcMs: number;
  readonly latitudeDeg: number;
  /** East positive. */
  readonly longitudeDeg: number;
  readonly heightM?: number;
  readonly pressureHpa?: number;
  readonly temperatureC?: number;
}

export interface SourcePosition {
  readonly source: LightSource;
  /** Apparent (refracted) topocentric elevation of the disc's centre. */
  readonly elevationDeg: number;
  /** Degrees clockwise from north (east = 90). */
  readonly azimuthDeg: number;
  /** Without refraction. */
  readonly trueElevationDeg: number;
  readonly refractionDeg: number;
  readonly refractionModel: string;
  /** Observer to the body's centre, km. */
  readonly distanceKm: number;
}

/** IAU 2012 Resolution B2: 149 597 870.7 km exactly. */
const KM_PER_AU = 149597870.7;

function bodyOf(source: LightSource): Body {
  return source === "sun" ? Body.Sun : Body.Moon;
}

/** Apparent topocentric elevation and azimuth (equator of date, with aberration) for an observer at a moment. */
export function sourcePosition(source: LightSource, at: PlaceAndMoment): SourcePosition {
  const date = new Date(at.utcMs);
  const observer = new Observer(at.latitudeDeg, at.longitudeDeg, at.heightM ?? 0);
  const equatorial = Equator(bodyOf(source), date, observer, true, true);
  // No refraction from the library: ours takes pressure and temperature.
  const horizontal = Horizon(date, observer, equatorial.ra, equatorial.dec);
  const refraction = refractionDeg(horizontal.altitude, at.pressureHpa, at.temperatureC);
  return {
    source,
    elevationDeg: horizontal.altitude + refraction,
    azimuthDeg: horizontal.azimuth,
    trueElevationDeg: horizontal.altitude,
    refractionDeg: refraction,
    refractionModel: REFRACTION_MODEL,
    distanceKm: equatorial.dist * KM_PER_AU,
  };
}

export interface MoonPhase {
  /** Sun–moon–earth angle, degrees (0 = full). */
  readonly phaseAngleDeg: number;
  /** Fraction of the disc lit, 0–1. */
  readonly illuminatedFraction: number;
}

/** The moon's phase angle seen from the earth's centre (astronomy-engine's Illumination). */
export function moonPhase(utcMs: number): MoonPhase {
  const info = Illumination(Body.Moon, new Date(utcMs));
  return { phaseAngleDeg: info.phase_angle, illuminatedFraction: info.phase_fraction };
}
