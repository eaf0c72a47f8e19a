// Requests whose source is given by a moment and a place become requests with plain angles, before any
// render: the routes, the jobs and the CLI call these, and the answers carry what was computed.

import type { ProfileRequest } from "../../schemas/profile.js";
import type { SkyRequest, ViewRequest } from "../../schemas/view.js";
import type { LutRequest } from "../../schemas/lut.js";
import type { SizeMapRequest } from "../../schemas/figures.js";
import { NO_LIGHT, positionAt, type SourcePositionMeta } from "./source-position.js";

export interface Resolved<T> {
  body: T;
  /** Set when the request gave a moment and a place. */
  sourcePosition?: SourcePositionMeta;
  warnings: string[];
}

type SunWithAt = ProfileRequest["sun"];

/** A profile-style `sun` (spectrum, atmosphere, elevationDeg, at) with `at` turned into elevationDeg. */
function resolveSun<S extends SunWithAt>(sun: S, field: string): { sun: S; sourcePosition?: SourcePositionMeta; warnings: string[] } {
  if (!sun.at) return { sun, warnings: [] };
  const { at, ...rest } = sun;
  const p = positionAt("sun", at, field);
  const spectrum = p.dark ? NO_LIGHT : rest.spectrum;
  return { sun: { ...rest, spectrum, elevationDeg: p.elevationDeg } as S, sourcePosition: p.meta, warnings: p.warnings };
}

export function resolveProfileRequest(body: ProfileRequest): Resolved<ProfileRequest> {
  const r = resolveSun(body.sun, "sun");
  return { body: r.sourcePosition ? { ...body, sun: r.sun } : body, sourcePosition: r.sourcePosition, warnings: r.warnings };
}

export function resolveSizeMapRequest(body: SizeMapRequest): Resolved<SizeMapRequest> {
  const r = resolveSun(body.sun, "sun");
  return { body: r.sourcePosition ? { ...body, sun: r.sun } : body, sourcePosition: r.sourcePosition, warnings: r.warnings };
}

export function resolveLutRequest(body: LutRequest): Resolved<LutRequest> {
  if (!body.scenario.sun) return { body, warnings: [] };
  const r = resolveSun(body.scenario.sun, "scenario.sun");
  return { body: r.sourcePosition ? { ...body, scenario: { ...body.scenario, sun: r.sun } } : body, sourcePosition: r.sourcePosition, warnings: r.warnings };
}

/** Views and sky maps: `sun` holds the position (azimuth, elevation or at), `scenario.sun` the light. */
export function resolveOverlayRequest<T extends ViewRequest | SkyRequest>(body: T): Resolved<T> {
  if (!body.sun.at) return { body, warnings: [] };
  const { at, ...rest } = body.sun;
  const p = positionAt("sun", at, "sun");
  const scenario = p.dark ? { ...body.scenario, sun: { ...body.scenario.sun, spectrum: NO_LIGHT } } : body.scenario;
  return { body: { ...body, scenario, sun: { ...rest, azimuthDeg: p.azimuthDeg, elevationDeg: p.elevationDeg } }, sourcePosition: p.meta, warnings: p.warnings };
}

/** Adds what was resolved to an answer's meta or manifest object. */
export function annotate(target: Record<string, unknown>, resolved: Resolved<unknown>): void {
  if (resolved.sourcePosition) target.sourcePosition = resolved.sourcePosition;
  if (resolved.warnings.length > 0) {
    const existing = Array.isArray(target.warnings) ? (target.warnings as string[]) : [];
    target.warnings = [...resolved.warnings, ...existing];
  }
}

/** The position as a header for answers that are not JSON. */
export function sourcePositionHeaders(p: SourcePositionMeta | undefined): Record<string, string> {
  if (!p) return {};
  return { "x-antisolar-source-position": JSON.stringify({ source: p.source, elevationDeg: p.elevationDeg, azimuthDeg: p.azimuthDeg, belowHorizon: p.belowHorizon }) };
}
