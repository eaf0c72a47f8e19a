// What a figure needs from a computed profile, and the shared wording of its caption.

import type { WavelengthGrid } from "../spectra/grid.js";
import type { SunSpectrumSource } from "../sun/sources.js";
import type { Attenuation } from "../bow/sunlight.js";
import type { Xyz } from "../colour/tristimulus.js";
import type { Observer } from "../colour/observers.js";
import type { OutputSpaceId } from "../colour/output-spaces.js";
import type { GamutMethod } from "../colour/gamut.js";
import { renderXyz, type WhiteHandling } from "../colour/render.js";

/** The request fields a caption describes; a validated profile request has all of them. */
export interface FigureRequest {
  drops: { kind: string; [field: string]: unknown };
  water: { temperatureC: number; salinityPsu: number };
  sun: {
    spectrum: SunSpectrumSource;
    elevationDeg: number;
    atmosphere: { attenuate: Attenuation; pressureHpa: number; angstromBeta: number; angstromAlpha: number };
    discDeg: number;
  };
  observer: Observer;
  method: string;
  /** Where along the bow (flattened drops): 0° top, 90° side, 180° lowest point. */
  arcPositionDeg?: number;
  output: { space: OutputSpaceId; gamut: GamutMethod; normalise: string; white: WhiteHandling };
}

/** The parts of a computed profile that the figures draw. */
export interface FigureProfile {
  request: FigureRequest;
  /** XYZ of the direct sunlight (any scale), the white under white = "sun". */
  sunWhite: Xyz;
  grid: WavelengthGrid;
  spectral: { anglesDeg: Float64Array };
  colour: { xyz: Float64Array; chromaticity: Float64Array; luminance: Float64Array; rgb: Float64Array; polarisation: Float64Array };
  bows: { primaryDeg: number | null; secondaryDeg: number | null };
  meta: Record<string, unknown>;
}

export function hashOf(p: FigureProfile): string {
  return String(p.meta.hash ?? "");
}

export function sourcesOf(p: FigureProfile): string[] {
  return Array.isArray(p.meta.sources) ? p.meta.sources.map(String) : [];
}

export function warningsOf(p: FigureProfile): string[] {
  return Array.isArray(p.meta.warnings) ? p.meta.warnings.map(String) : [];
}

const n3 = (v: unknown) => (typeof v === "number" ? Number(v.toPrecision(3)).toString() : String(v));

export function describeDrops(drops: FigureRequest["drops"]): string {
  const d = drops as Record<string, unknown>;
  switch (drops.kind) {
    case "monodisperse":
      return `monodisperse, radius ${n3(d.radiusUm)} µm`;
    case "marshall-palmer":
      return `Marshall–Palmer, ${n3(d.rainRateMmPerH)} mm/h`;
    case "gamma":
      return `gamma, D0 ${n3(d.medianVolumeDiameterMm)} mm, μ ${n3(d.mu)}`;
    case "lognormal":
      return `lognormal, median radius ${n3(d.medianRadiusUm)} µm, σg ${n3(d.geometricSd)}`;
    case "histogram": {
      const bins = Array.isArray(d.bins) ? (d.bins as { radiusUm: number }[]) : [];
      return bins.length ? `histogram of ${bins.length} bins, ${n3(bins[0].radiusUm)}–${n3(bins[bins.length - 1].radiusUm)} µm` : "histogram";
    }
    default:
      return drops.kind;
  }
}

function describeSpectrum(s: SunSpectrumSource): string {
  switch (s.kind) {
    case "astm-g173":
      return `ASTM G173-03 ${s.column}`;
    case "blackbody":
      return `blackbody ${s.temperatureK} K`;
    case "cie-d65":
      return "CIE D65";
    case "cie-daylight":
      return `CIE daylight ${s.cctK} K`;
    case "table":
      return "tabulated spectrum";
  }
}

function describeEngines(meta: Record<string, unknown>): string {
  const method = meta.method as { engines?: { engine: string; fromUm: number; toUm: number }[] } | undefined;
  if (!method?.engines?.length) return "";
  return method.engines
    .map((e) => (e.fromUm === e.toUm ? `${e.engine} at ${n3(e.fromUm)} µm` : `${e.engine} ${n3(e.fromUm)}–${n3(e.toUm)} µm`))
    .join(", ");
}

/** "Mie rows averaged over 512 sizes per decade" when the profile averaged the Mie ripple (meta.radii), else "". */
function describeAveraging(meta: Record<string, unknown>): string {
  const radii = meta.radii as { nodesPerDecade?: number; mieSizesPerDecade?: number } | undefined;
  const sizes = radii?.mieSizesPerDecade;
  return sizes !== undefined && radii?.nodesPerDecade !== undefined && sizes > radii.nodesPerDecade ? `Mie rows averaged over ${sizes} sizes per decade` : "";
}

/** One sentence naming the scenario: drops, sun, water, method, observer, output and normalisation. */
export function scenarioSentence(request: FigureRequest, meta: Record<string, unknown> = {}, includeDrops = true): string {
  const engines = [describeEngines(meta), describeAveraging(meta)].filter((s) => s !== "").join(", ");
  const parts = [
    includeDrops ? `drops ${describeDrops(request.drops)}` : "",
    describeShape(request),
    `sun ${n3(request.sun.elevationDeg)}° high (${describeSpectrum(request.sun.spectrum)}, disc ${n3(request.sun.discDeg)}°)`,
    `water ${n3(request.water.temperatureC)} °C, ${n3(request.water.salinityPsu)} PSU`,
    `method ${request.method}${engines ? ` (${engines})` : ""}`,
    `observer ${request.observer === "cie1931-2" ? "CIE 1931 2°" : "CIE 1964 10°"}`,
    `normalisation ${request.output.normalise}`,
    `white ${request.output.white}`,
  ].filter((s) => s !== "");
  return `Scenario: ${parts.join("; ")}.`;
}

/** The drops' shape when they are not spheres, and the place on the bow it was taken at; "" for spheres. */
export function describeShape(request: Pick<FigureRequest, "drops" | "arcPositionDeg">): string {
  const shape = request.drops.shape as { kind: string; axisRatio?: number; cantingSdDeg?: number } | undefined;
  if (!shape || shape.kind === "sphere") return "";
  const kind = shape.kind === "equilibrium" ? "equilibrium shapes (Beard & Chuang 1987)" : `spheroids of axis ratio ${n3(shape.axisRatio)}`;
  const arc = request.arcPositionDeg ?? 90;
  const where = arc === 0 ? " (top of the bow)" : arc === 90 ? " (side)" : arc === 180 ? " (lowest point)" : "";
  return `flattened drops: ${kind}, canting σ ${n3(shape.cantingSdDeg)}°, at arc position ${n3(arc)}°${where}`;
}

/**
 * Encoded sRGB triples for drawing: the profile's own when it was rendered to sRGB, else its XYZ rendered again
 * (relative to the peak, CSS Color 4 gamut mapping) with the request's white handling.
 */
export function srgbColours(p: FigureProfile): Float64Array {
  if (p.request.output.space === "srgb") return p.colour.rgb;
  const xyz = p.colour.xyz;
  let peak = 0;
  for (let i = 1; i < xyz.length; i += 3) peak = Math.max(peak, xyz[i]);
  const relative = xyz.map((v) => (peak > 0 ? v / peak : v));
  const white = p.request.output.white;
  return renderXyz(relative, {
    space: "srgb",
    gamut: "css4",
    white,
    sunWhite: white === "sun" ? p.sunWhite : undefined,
  }).values;
}
