// The bow profile for illustrators: luminance and degree of polarisation against ψ, with the colour strip below.

import { axis, linearScale, niceTicks } from "./axes.js";
import { element, hexColour, pointsAttribute, svgDocument, text, textBlock, wrapText } from "./svg.js";
import { type FigureProfile, hashOf, scenarioSentence, sourcesOf, srgbColours, warningsOf } from "./figure-input.js";

const WIDTH = 960;
const PLOT = { left: 86, right: 874, top: 64, bottom: 384 };
const STRIP = { top: 392, height: 40 };
const CAPTION_CHARS = 150;
const LUMINANCE_COLOUR = "#1a1a1a";
const POLARISATION_COLOUR = "#1f5fa8";

function maxOf(values: Float64Array): number {
  let m = -Infinity;
  for (const v of values) if (Number.isFinite(v)) m = Math.max(m, v);
  return m;
}

export function profileSvg(p: FigureProfile): string {
  const angles = p.spectral.anglesDeg;
  const n = angles.length;
  const { luminance, polarisation } = p.colour;
  const physical = p.request.output.normalise === "physical";
  const from = angles[0];
  const to = angles[n - 1] > from ? angles[n - 1] : from + 1;
  const x = linearScale([from, to], [PLOT.left, PLOT.right]);
  const lumTicks = niceTicks(0, Math.max(maxOf(luminance), 1e-30), 5);
  const lumTop = Math.max(lumTicks[lumTicks.length - 1], maxOf(luminance));
  const yLum = linearScale([0, lumTop], [PLOT.bottom, PLOT.top]);
  const signed = Array.from(polarisation).some((v) => v < -1e-6);
  const yPol = linearScale(signed ? [-1, 1] : [0, 1], [PLOT.bottom, PLOT.top]);
  const polTicks = signed ? [-1, -0.5, 0, 0.5, 1] : [0, 0.2, 0.4, 0.6, 0.8, 1];
  const parts: string[] = [];

  parts.push(text(WIDTH / 2, 26, "Rainbow profile: luminance, polarisation and colour against the angle from the antisolar point", { "font-size": 16, "font-weight": "bold", "text-anchor": "middle", fill: "#111111" }));

  // Alexander's dark band lies between the two bows; shade it before the curves so they stay on top.
  const { primaryDeg, secondaryDeg } = p.bows;
  const marks: string[] = [];
  if (primaryDeg !== null && secondaryDeg !== null) {
    const x0 = x(primaryDeg);
    const x1 = x(secondaryDeg);
    marks.push(element("rect", { id: "dark-band", x: x0, y: PLOT.top, width: x1 - x0, height: PLOT.bottom - PLOT.top, fill: "#000000", "fill-opacity": 0.07 }));
    marks.push(text((x0 + x1) / 2, PLOT.top + 36, "Alexander's dark band", { id: "dark-band-label", "font-size": 12, "text-anchor": "middle", fill: "#444444", "font-style": "italic" }));
  }
  const bowLine = (id: string, deg: number, label: string, anchor: "start" | "end") => {
    const bx = x(deg);
    return (
      element("line", { id, x1: bx, y1: PLOT.top, x2: bx, y2: PLOT.bottom, stroke: "#b03a2e", "stroke-width": 1.2, "stroke-dasharray": "5 3" }) +
      text(bx + (anchor === "start" ? 5 : -5), PLOT.top + 16, `${label} ${deg.toFixed(2)}°`, { id: `${id}-label`, "font-size": 12, "text-anchor": anchor, fill: "#b03a2e" })
    );
  };
  if (primaryDeg !== null) marks.push(bowLine("primary-bow", primaryDeg, "primary bow", "end"));
  if (secondaryDeg !== null) marks.push(bowLine("secondary-bow", secondaryDeg, "secondary bow", "start"));

  const grid = niceTicks(from, to, 10)
    .map((v) => element("line", { x1: x(v), y1: PLOT.top, x2: x(v), y2: PLOT.bottom, stroke: "#e4e4e4", "stroke-width": 1 }))
    .join("");
  parts.push(element("g", { class: "grid" }, grid));
  parts.push(element("g", { class: "bow-marks" }, marks.join("")));

  const lumPoints: [number, number][] = [];
  const polPoints: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    if (Number.isFinite(luminance[i])) lumPoints.push([x(angles[i]), yLum(luminance[i])]);
    if (Number.isFinite(polarisation[i])) polPoints.push([x(angles[i]), yPol(polarisation[i])]);
  }
  parts.push(element("polyline", { id: "polarisation-curve", points: pointsAttribute(polPoints), fill: "none", stroke: POLARISATION_COLOUR, "stroke-width": 1.6, "stroke-dasharray": "7 4", "stroke-linejoin": "round" }));
  parts.push(element("polyline", { id: "luminance-curve", points: pointsAttribute(lumPoints), fill: "none", stroke: LUMINANCE_COLOUR, "stroke-width": 2, "stroke-linejoin": "round" }));
  parts.push(element("rect", { x: PLOT.left, y: PLOT.top, width: PLOT.right - PLOT.left, height: PLOT.bottom - PLOT.top, fill: "none", stroke: "#888888", "stroke-width": 1 }));

  // The colour strip: one rectangle per sample, centred on its angle, overlapping by half a pixel to hide seams.
  const rgb = srgbColours(p);
  const rects: string[] = [];
  for (let i = 0; i < n; i++) {
    const left = i === 0 ? PLOT.left : (x(angles[i - 1]) + x(angles[i])) / 2;
    const right = i === n - 1 ? PLOT.right : (x(angles[i]) + x(angles[i + 1])) / 2;
    rects.push(element("rect", { x: left, y: STRIP.top, width: right - left + (i === n - 1 ? 0 : 0.5), height: STRIP.height, fill: hexColour(rgb[3 * i], rgb[3 * i + 1], rgb[3 * i + 2]) }));
  }
  parts.push(element("g", { id: "colour-strip", "shape-rendering": "crispEdges" }, rects.join("")));
  const stripBottom = STRIP.top + STRIP.height;

  parts.push(axis({ id: "psi", scale: x, ticks: niceTicks(from, to, 10), at: stripBottom, side: "bottom", label: "ψ, angle from the antisolar point (degrees)" }));
  parts.push(axis({ id: "luminance", scale: yLum, ticks: lumTicks, at: PLOT.left, side: "left", label: physical ? "luminance (cd/m²)" : "luminance (relative, peak = 1)", colour: LUMINANCE_COLOUR }));
  parts.push(axis({ id: "polarisation", scale: yPol, ticks: polTicks, at: PLOT.right, side: "right", label: "degree of linear polarisation (I⊥ − I∥)/(I⊥ + I∥)", colour: POLARISATION_COLOUR }));

  // Legend above the plot, right-aligned.
  const lx = PLOT.right - 420;
  parts.push(
    element(
      "g",
      { id: "legend" },
      element("line", { x1: lx, y1: 48, x2: lx + 28, y2: 48, stroke: LUMINANCE_COLOUR, "stroke-width": 2 }) +
        text(lx + 34, 52, "luminance (left axis)", { "font-size": 12, fill: "#222222" }) +
        element("line", { x1: lx + 200, y1: 48, x2: lx + 228, y2: 48, stroke: POLARISATION_COLOUR, "stroke-width": 1.6, "stroke-dasharray": "7 4" }) +
        text(lx + 234, 52, "degree of polarisation (right axis)", { "font-size": 12, fill: "#222222" }),
    ),
  );

  const hash = hashOf(p);
  const sources = sourcesOf(p);
  const scenario = scenarioSentence(p.request, p.meta);
  const stripNote =
    p.request.output.space === "srgb"
      ? "Colour strip: the profile's sRGB colours (IEC 61966-2-1)."
      : `Colour strip: the profile's XYZ rendered to sRGB (IEC 61966-2-1) with CSS Color 4 gamut mapping; the request asked for ${p.request.output.space}.`;
  const lines = [
    ...wrapText(scenario, CAPTION_CHARS),
    ...wrapText(stripNote, CAPTION_CHARS),
    ...warningsOf(p).flatMap((w) => wrapText(`Note: ${w}`, CAPTION_CHARS)),
    `Content hash of the normalised request: ${hash}`,
  ];
  const caption = textBlock(PLOT.left - 60, stripBottom + 56, lines, 15, { "font-size": 11.5, fill: "#222222" });
  const sourceLines = ["Sources:", ...sources.flatMap((s) => wrapText(`• ${s}`, CAPTION_CHARS + 10))];
  const sourceBlock = textBlock(PLOT.left - 60, caption.bottom + 6, sourceLines, 13, { "font-size": 10.5, fill: "#444444" });
  parts.push(element("g", { id: "caption" }, caption.markup));
  parts.push(element("g", { id: "sources" }, sourceBlock.markup));

  const desc =
    `Luminance and degree of linear polarisation of the rainbow against ψ from ${from}° to ${to}°, with the colour of each angle below. ` +
    (primaryDeg !== null ? `Primary bow at ${primaryDeg}°. ` : "No primary bow in range. ") +
    (secondaryDeg !== null ? `Secondary bow at ${secondaryDeg}°. ` : "No secondary bow in range. ") +
    `${scenario} Content hash ${hash}. Sources: ${sources.join("; ")}.`;
  return svgDocument({ width: WIDTH, height: sourceBlock.bottom + 18, title: "Rainbow profile against the angle from the antisolar point", desc, body: parts.join("\n") });
}

