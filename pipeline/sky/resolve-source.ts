// Requests whose source is given by a moment and a place become requests with plain angles, before any
// render: the routes, the jobs and the CLI call these, and the answers carry what was computed.

import type { ProfileRequest } from "../../schemas/profile.js";
import type { SkyRequest, ViewRequest } from "../../schemas/view.js";
import type { LutRequest } from "../../schemas/lut.js";
import type { SizeMapRequest } from "../../schemas/figures.js";
import { NO_LIGHT, positionAt, type SourcePositionMeta } from "./source-position.js";
import { moonAsSun, type MoonlightMeta } from "./moon-source.js";
import { defaultSun } from "../../schemas/profile.js";
import { sunPositionSchema } from "../../schemas/view.js";
import { ClientError } from "../requests/client-error.js";

/** The part of a profile's meta or a manifest (schemas/responses/) that a resolved source adds to. */
export interface SourceAnnotated {
  sources: string[];
  warnings: string[];
  sourcePosition?: SourcePositionMeta;
  moonlight?: MoonlightMeta;
}

export interface Resolved<T> {
  body: T;
  /** Set when the request gave a moment and a place. */
  sourcePosition?: SourcePositionMeta;
  /** Set when the moon is the light. */
  moonlight?: MoonlightMeta;
  warnings: string[];
}

const defaultSunPosition = sunPositionSchema.parse({});

/** `moon` replaces `sun`: a sun set beside it would be silently ignored, so it is refused. */
function refuseBoth(sun: unknown, defaults: unknown, sunField: string, moonField: string): void {
  if (JSON.stringify(sun) !== JSON.stringify(defaults)) {
    throw new ClientError("invalid-request", `body fields '${sunField}' and '${moonField}' are both given: the light is the sun or the moon, so leave ${sunField} out`, {
      field: sunField,
      allowed: `either ${sunField} or ${moonField}`,
    });
  }
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

/** A profile-style body with `moon`: the moon becomes its `sun`. */
function resolveMoon<B extends { sun: SunWithAt; moon?: ProfileRequest["moon"] }>(body: B, prefix: string): Resolved<B> | undefined {
  if (!body.moon) return undefined;
  refuseBoth(body.sun, defaultSun, `${prefix}sun`, `${prefix}moon`);
  const m = moonAsSun(body.moon, `${prefix}moon`);
  const { moon: _moon, ...rest } = body;
  return { body: { ...rest, sun: m.sun } as B, sourcePosition: m.sourcePosition, moonlight: m.moonlight, warnings: m.warnings };
}

export function resolveProfileRequest(body: ProfileRequest): Resolved<ProfileRequest> {
  const moon = resolveMoon(body, "");
  if (moon) return moon;
  const r = resolveSun(body.sun, "sun");
  return { body: r.sourcePosition ? { ...body, sun: r.sun } : body, sourcePosition: r.sourcePosition, warnings: r.warnings };
}

export function resolveSizeMapRequest(body: SizeMapRequest): Resolved<SizeMapRequest> {
  const moon = resolveMoon(body, "");
  if (moon) return moon;
  const r = resolveSun(body.sun, "sun");
  return { body: r.sourcePosition ? { ...body, sun: r.sun } : body, sourcePosition: r.sourcePosition, warnings: r.warnings };
}

export function resolveLutRequest(body: LutRequest): Resolved<LutRequest> {
  if (body.scenario.moon) {
    const moon = resolveMoon({ ...body.scenario, sun: body.scenario.sun ?? defaultSun }, "scenario.");
    if (moon) return { ...moon, body: { ...body, scenario: moon.body } };
  }
  if (!body.scenario.sun) return { body, warnings: [] };
  const r = resolveSun(body.scenario.sun, "scenario.sun");
  return { body: r.sourcePosition ? { ...body, scenario: { ...body.scenario, sun: r.sun } } : body, sourcePosition: r.sourcePosition, warnings: r.warnings };
}

/** Views and sky maps: `sun` holds the position (azimuth, elevation or at), `scenario.sun` the light. */
export function resolveOverlayRequest<T extends ViewRequest | SkyRequest>(body: T): Resolved<T> {
  if (body.moon) {
    refuseBoth(body.sun, defaultSunPosition, "sun", "moon");
    const m = moonAsSun(body.moon, "moon");
    const { moon: _moon, ...rest } = body;
    const { elevationDeg, ...light } = m.sun;
    const scenario = { ...body.scenario, sun: light };
    return { body: { ...rest, scenario, sun: { azimuthDeg: m.azimuthDeg ?? 0, elevationDeg } } as T, sourcePosition: m.sourcePosition, moonlight: m.moonlight, warnings: m.warnings };
  }
  if (!body.sun.at) return { body, warnings: [] };
  const { at, ...rest } = body.sun;
  const p = positionAt("sun", at, "sun");
  const scenario = p.dark ? { ...body.scenario, sun: { ...body.scenario.sun, spectrum: NO_LIGHT } } : body.scenario;
  return { body: { ...body, scenario, sun: { ...rest, azimuthDeg: p.azimuthDeg, elevationDeg: p.elevationDeg } }, sourcePosition: p.meta, warnings: p.warnings };
}

/** Adds what was resolved to an answer's meta or manifest object. */
export function annotate(target: SourceAnnotated, resolved: Resolved<unknown>): void {
  if (resolved.sourcePosition) target.sourcePosition = resolved.sourcePosition;
  if (resolved.moonlight) {
    target.moonlight = resolved.moonlight;
    target.sources = [...target.sources, ...resolved.moonlight.sources];
  }
  if (resolved.warnings.length > 0) target.warnings = [...resolved.warnings, ...target.warnings];
}

/** The position as a header for answers that are not JSON. */
export function sourcePositionHeaders(p: SourcePositionMeta | undefined): Record<string, string> {
  if (!p) return {};
  return { "x-antisolar-source-position": JSON.stringify({ source: p.source, elevationDeg: p.elevationDeg, azimuthDeg: p.azimuthDeg, belowHorizon: p.belowHorizon }) };
}
