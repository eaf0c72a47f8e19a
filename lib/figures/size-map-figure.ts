// Colour against ψ and drop radius, one monodisperse profile per row (the diagram type of Lee 1998, "Mie theory, Airy theory, and the natural rainbow", Appl. Opt. 37, 1506).

import { axis, linearScale, logScale, logTicks, niceTicks } from "./axes.js";
import { element, hexColour, svgDocument, text, textBlock, wrapText } from "./svg.js";

export interface SizeMapData {
  /** Ascending radii, µm, one per row. */
  radiiUm: Float64Array;
  anglesDeg: Float64Array;
  /** Encoded sRGB, row-major [radius][angle][rgb], each row relative to its own peak luminance. */
  srgb: Float64Array;
  bows: { primaryDeg: number | null; secondaryDeg: number | null }[];
  scenario: string;
  hash: string;
  sources: string[];
}

/** The published sources of the diagram itself, before those of the profiles in its rows. */
export const SIZE_MAP_SOURCES = ["Lee 1998, Applied Optics 37, 1506 (diagram type: colour against angle and drop size)", "sRGB: IEC 61966-2-1:1999"];

const WIDTH = 960;
const PLOT = { left: 96, right: 900, top: 64, bottom: 504 };
const CAPTION_CHARS = 150;

/** Log-spaced radii from fromUm to toUm inclusive. */
export function logSpacedRadii(fromUm: number, toUm: number, steps: number): Float64Array {
  const out = new Float64Array(steps);
  for (let i = 0; i < steps; i++) out[i] = steps === 1 ? fromUm : fromUm * (toUm / fromUm) ** (i / (steps - 1));
  return out;
}

/** Cell edges half-way (geometrically) between neighbours; the outer edges mirror the inner ones. */
function edges(values: Float64Array, log: boolean): Float64Array {
  const n = values.length;
  const mid = (a: number, b: number) => (log ? Math.sqrt(a * b) : (a + b) / 2);
  const out = new Float64Array(n + 1);
  for (let i = 1; i < n; i++) out[i] = mid(values[i - 1], values[i]);
  if (n === 1) {
    out[0] = log ? values[0] / 1.05 : values[0] - 0.5;
    out[1] = log ? values[0] * 1.05 : values[0] + 0.5;
  } else {
    out[0] = log ? (values[0] * values[0]) / out[1] : 2 * values[0] - out[1];
    out[n] = log ? (values[n - 1] * values[n - 1]) / out[n - 1] : 2 * values[n - 1] - out[n - 1];
  }
  return out;
}

/** 8-bit RGB raster, one pixel per (angle, radius) sample; the top row is the largest radius, as on the plot. */
export function sizeMapRaster(map: SizeMapData): { pixels: Uint8Array; width: number; height: number } {
  const width = map.anglesDeg.length;
  const height = map.radiiUm.length;
  const pixels = new Uint8Array(width * height * 3);
  for (let r = 0; r < height; r++) {
    const row = height - 1 - r;
    for (let k = 0; k < width * 3; k++) {
      const v = map.srgb[r * width * 3 + k];
      pixels[row * width * 3 + k] = Math.round(Math.min(1, Math.max(0, Number.isFinite(v) ? v : 0)) * 255);
    }
  }
  return { pixels, width, height };
}

export function sizeMapSvg(map: SizeMapData): string {
  const nr = map.radiiUm.length;
  const na = map.anglesDeg.length;
  const aEdges = edges(map.anglesDeg, false);
  const rEdges = edges(map.radiiUm, true);
  const x = linearScale([aEdges[0], aEdges[na]], [PLOT.left, PLOT.right]);
  const y = logScale([rEdges[0], rEdges[nr]], [PLOT.bottom, PLOT.top]);
  const parts: string[] = [];
  parts.push(text(WIDTH / 2, 28, "Rainbow colour against the angle from the antisolar point and the drop radius", { "font-size": 16, "font-weight": "bold", "text-anchor": "middle", fill: "#111111" }));
  parts.push(text(WIDTH / 2, 48, "each row: drops of one size, normalised to its own peak luminance (row peak = 1)", { "font-size": 12, "text-anchor": "middle", fill: "#444444" }));

  const cells: string[] = [];
  for (let r = 0; r < nr; r++) {
    const top = y(rEdges[r + 1]);
    const height = y(rEdges[r]) - top;
    for (let a = 0; a < na; a++) {
      const k = 3 * (r * na + a);
      const left = x(aEdges[a]);
      const width = x(aEdges[a + 1]) - left + (a === na - 1 ? 0 : 0.5);
      cells.push(element("rect", { x: left, y: top, width, height: height + (r === nr - 1 ? 0 : 0.5), fill: hexColour(map.srgb[k], map.srgb[k + 1], map.srgb[k + 2]) }));
    }
  }
  parts.push(element("g", { id: "size-map-cells", "shape-rendering": "crispEdges" }, cells.join("")));

  // Per-row bow peaks as small ticks, so the drift of the bows with drop size can be read off.
  const peaks: string[] = [];
  map.bows.forEach((b, r) => {
    const cy = y(map.radiiUm[r]);
    for (const [deg, cls] of [
      [b.primaryDeg, "primary-peak"],
      [b.secondaryDeg, "secondary-peak"],
    ] as const) {
      if (deg === null) continue;
      peaks.push(element("circle", { class: cls, cx: x(deg), cy, r: 1.8, fill: "#ffffff", stroke: "#000000", "stroke-width": 0.6 }));
    }
  });
  parts.push(element("g", { id: "bow-peaks" }, peaks.join("")));
  parts.push(element("rect", { x: PLOT.left, y: PLOT.top, width: PLOT.right - PLOT.left, height: PLOT.bottom - PLOT.top, fill: "none", stroke: "#555555" }));

  parts.push(axis({ id: "psi", scale: x, ticks: niceTicks(map.anglesDeg[0], map.anglesDeg[na - 1], 10), at: PLOT.bottom, side: "bottom", label: "ψ, angle from the antisolar point (degrees)" }));
  parts.push(
    axis({
      id: "radius",
      scale: y,
      ticks: logTicks(rEdges[0], rEdges[nr]),
      at: PLOT.left,
      side: "left",
      label: "drop radius (µm, logarithmic scale)",
    }),
  );

  const sourceList = [...SIZE_MAP_SOURCES, ...map.sources];
  const lines = [
    ...wrapText(
      `${nr} drop radii from ${Number(map.radiiUm[0].toPrecision(3))} to ${Number(map.radiiUm[nr - 1].toPrecision(3))} µm, log-spaced; ${na} angles from ${map.anglesDeg[0]}° to ${map.anglesDeg[na - 1]}°. ` +
        "Every row is a monodisperse profile whose colours are scaled so that the row's brightest sample has luminance 1: compare hues and shapes across rows, not brightness. " +
        "Dots: each row's primary and secondary luminance peak.",
      CAPTION_CHARS,
    ),
    ...wrapText(map.scenario, CAPTION_CHARS),
    `Content hash of the normalised request: ${map.hash}`,
  ];
  const caption = textBlock(24, PLOT.bottom + 52, lines, 15, { "font-size": 11.5, fill: "#222222" });
  const sourceBlock = textBlock(24, caption.bottom + 6, ["Sources:", ...sourceList.flatMap((s) => wrapText(`• ${s}`, CAPTION_CHARS + 10))], 13, { "font-size": 10.5, fill: "#444444" });
  parts.push(element("g", { id: "caption" }, caption.markup));
  parts.push(element("g", { id: "sources" }, sourceBlock.markup));

  const desc =
    `Colour of the rainbow against ψ (${map.anglesDeg[0]}–${map.anglesDeg[na - 1]}°) and drop radius (${Number(map.radiiUm[0].toPrecision(3))}–${Number(map.radiiUm[nr - 1].toPrecision(3))} µm, log scale), ` +
    `each row normalised to its own peak luminance. ${map.scenario} Content hash ${map.hash}. Sources: ${sourceList.join("; ")}.`;
  return svgDocument({ width: WIDTH, height: sourceBlock.bottom + 18, title: "Rainbow colour against angle and drop radius", desc, body: parts.join("\n") });
}
