// A source's position given as a moment and a place (`at`): computed once, before any render, so that every
// endpoint, job and the CLI see plain elevation and azimuth, and the answer states what was computed.

import { sourcePosition, type LightSource, type SourcePosition } from "../../lib/sky/source-position.js";
import type { PlaceAndMomentInput } from "../../schemas/place-and-time.js";
import { ClientError } from "../requests/client-error.js";

/** What the answer states about the source's position (meta.sourcePosition, the manifests' sourcePosition). */
export interface SourcePositionMeta {
  source: LightSource;
  utc: string;
  latitudeDeg: number;
  longitudeDeg: number;
  heightM: number;
  /** Apparent (refracted) topocentric elevation of the disc's centre, degrees. */
  elevationDeg: number;
  /** Degrees clockwise from north (east = 90). */
  azimuthDeg: number;
  trueElevationDeg: number;
  refractionDeg: number;
  refractionModel: string;
  ephemeris: string;
  distanceKm: number;
  belowHorizon: boolean;
}

export interface ResolvedPosition {
  /** Clamped to the schemas' range (−1° to 90°) for the render; meta holds the computed value. */
  elevationDeg: number;
  azimuthDeg: number;
  meta: SourcePositionMeta;
  /** Below the horizon and the caller asked for a black result. */
  dark: boolean;
  warnings: string[];
}

const EPHEMERIS = "astronomy-engine 2 (D. Cross): VSOP87 sun; moon from the Improved Lunar Ephemeris 1954 (Brown) after Montenbruck & Pfleger; apparent topocentric, equator of date";

const round = (v: number, digits = 6) => Number(v.toFixed(digits));

/**
 * The source's apparent position for a place and a moment. A centre below the horizon (apparent elevation < 0°)
 * is a 422 unless the caller asked for a black result (at.belowHorizon = "black"). `field` names the object
 * holding `at` in the request, for the error.
 */
export function positionAt(source: LightSource, at: PlaceAndMomentInput, field: string): ResolvedPosition {
  const p: SourcePosition = sourcePosition(source, {
    utcMs: Date.parse(at.utc),
    latitudeDeg: at.latitudeDeg,
    longitudeDeg: at.longitudeDeg,
    heightM: at.heightM,
    pressureHpa: at.pressureHpa,
    temperatureC: at.temperatureC,
  });
  const below = p.elevationDeg < 0;
  const meta: SourcePositionMeta = {
    source,
    utc: new Date(Date.parse(at.utc)).toISOString(),
    latitudeDeg: at.latitudeDeg,
    longitudeDeg: at.longitudeDeg,
    heightM: at.heightM ?? 0,
    elevationDeg: round(p.elevationDeg),
    azimuthDeg: round(p.azimuthDeg),
    trueElevationDeg: round(p.trueElevationDeg),
    refractionDeg: round(p.refractionDeg),
    refractionModel: p.refractionModel,
    ephemeris: EPHEMERIS,
    distanceKm: Math.round(p.distanceKm),
    belowHorizon: below,
  };
  const warnings: string[] = [];
  if (below) {
    const where = `${at.latitudeDeg}°, ${at.longitudeDeg}°`;
    const depth = `${(-p.elevationDeg).toFixed(2)}° below the horizon`;
    if (at.belowHorizon !== "black") {
      throw new ClientError("source-below-horizon", `body field '${field}.at.utc': at ${meta.utc} the ${source} is ${depth} at ${where}, so there is no bow to render`, {
        field: `${field}.at.utc`,
        allowed: `a moment when the ${source} is above the horizon there, or ${field}.at.belowHorizon "black" for a black result`,
        elevationDeg: meta.elevationDeg,
        azimuthDeg: meta.azimuthDeg,
      });
    }
    warnings.push(`the ${source} is ${depth} at ${meta.utc} at ${where}: the result is black (belowHorizon "black")`);
  }
  return { elevationDeg: Math.min(90, Math.max(-1, p.elevationDeg)), azimuthDeg: p.azimuthDeg, meta, dark: below, warnings };
}

/** A spectrum of no light: what a source below the horizon sends to the drops. */
export const NO_LIGHT = { kind: "table" as const, wavelengthsNm: [200, 2000], values: [0, 0] };
