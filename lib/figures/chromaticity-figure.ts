// CIE chromaticity diagram with the bow's colour path, the sun's white and the sRGB gamut.

import { cmfTables, type Observer } from "../colour/observers.js";
import { chromaticity, type Chromaticity } from "../colour/tristimulus.js";
import { spacePrimaries } from "../colour/primaries.js";
import { axis, linearScale, niceTicks, type Scale } from "./axes.js";
import { element, hexColour, pointsAttribute, px, svgDocument, text, textBlock, wrapText } from "./svg.js";
import { LabelPlacer } from "./labels.js";
import { type FigureProfile, hashOf, scenarioSentence, sourcesOf, srgbColours } from "./figure-input.js";

/** Wavelengths labelled on the locus, nm (spaced where the locus runs fast, as is usual on such diagrams). */
export const LOCUS_LABELS_NM = [460, 470, 480, 490, 500, 510, 520, 540, 560, 580, 600, 620, 700] as const;

const LOCUS_DATA: Record<Observer, { name: string; citation: string }> = {
  "cie1931-2": {
    name: "CIE 1931 2° standard observer",
    citation:
      "Spectrum locus from the CIE 1931 2° colour-matching functions: CIE (2019), ISO/CIE 11664-1:2019, dataset DOI 10.25039/CIE.DS.xvudnb9b, © CIE, licence CC BY-SA 4.0",
  },
  "cie1964-10": {
    name: "CIE 1964 10° standard observer",
    citation:
      "Spectrum locus from the CIE 1964 10° colour-matching functions: CIE (2019), ISO/CIE 11664-1:2019, dataset DOI 10.25039/CIE.DS.sqksu2n5, © CIE, licence CC BY-SA 4.0",
  },
};

const SRGB_SOURCE = "sRGB primaries and white: IEC 61966-2-1:1999 (ITU-R BT.709-6 primaries, D65)";

/** The published sources of the diagram itself, before those of the profile drawn on it. */
export function chromaticityFigureSources(observer: Observer): string[] {
  return [LOCUS_DATA[observer].citation, SRGB_SOURCE];
}

const MAIN = { left: 74, top: 64, unitPx: 700, xMax: 0.8, yMax: 0.9 };
const DETAIL = { left: 740, top: 64, size: 300 };
const WIDTH = 1080;
const CAPTION_CHARS = 165;

export interface LocusPoint {
  wavelengthNm: number;
  x: number;
  y: number;
}

/** x = x̄/(x̄+ȳ+z̄), y = ȳ/(x̄+ȳ+z̄) at every tabulated wavelength (CIE 015:2018 Eq. 7.3 applied to the CMFs). */
export function spectrumLocus(observer: Observer): LocusPoint[] {
  const t = cmfTables(observer);
  const out: LocusPoint[] = [];
  for (let i = 0; i < t.xBar.values.length; i++) {
    const X = t.xBar.values[i];
    const Y = t.yBar.values[i];
    const Z = t.zBar.values[i];
    const sum = X + Y + Z;
    if (sum > 0) out.push({ wavelengthNm: t.xBar.wavelengthsNm[i], x: X / sum, y: Y / sum });
  }
  return out;
}

function bowPoints(p: FigureProfile): { x: number; y: number; psi: number }[] {
  const c = p.colour.chromaticity;
  const out: { x: number; y: number; psi: number }[] = [];
  for (let i = 0; i < p.spectral.anglesDeg.length; i++) {
    if (Number.isFinite(c[2 * i]) && Number.isFinite(c[2 * i + 1])) out.push({ x: c[2 * i], y: c[2 * i + 1], psi: p.spectral.anglesDeg[i] });
  }
  return out;
}

function nearestSample(p: FigureProfile, deg: number): number {
  let best = 0;
  p.spectral.anglesDeg.forEach((a, i) => {
    if (Math.abs(a - deg) < Math.abs(p.spectral.anglesDeg[best] - deg)) best = i;
  });
  return best;
}

function marker(id: string, cx: number, cy: number, fill: string, r = 4.5): string {
  return element("circle", { id, cx, cy, r, fill, stroke: "#ffffff", "stroke-width": 1.2 });
}

function sunSymbol(id: string, cx: number, cy: number): string {
  return element(
    "g",
    { id },
    element("circle", { cx, cy, r: 5.5, fill: "#ffd23f", stroke: "#7a5c00", "stroke-width": 1.2 }) + element("circle", { cx, cy, r: 1.3, fill: "#7a5c00" }),
  );
}

export function chromaticitySvg(p: FigureProfile): string {
  const observer = p.request.observer;
  const locus = spectrumLocus(observer);
  const xs = linearScale([0, MAIN.xMax], [MAIN.left, MAIN.left + MAIN.xMax * MAIN.unitPx]);
  const ys = linearScale([0, MAIN.yMax], [MAIN.top + MAIN.yMax * MAIN.unitPx, MAIN.top]);
  const mainBottom = ys(0);
  const mainRight = xs(MAIN.xMax);
  const at = (q: Chromaticity, sx: Scale = xs, sy: Scale = ys): [number, number] => [sx(q.x), sy(q.y)];
  const parts: string[] = [];
  const title = `Chromaticity of the rainbow on the CIE ${observer === "cie1931-2" ? "1931" : "1964"} (x, y) diagram`;
  parts.push(text(WIDTH / 2, 28, title, { "font-size": 16, "font-weight": "bold", "text-anchor": "middle", fill: "#111111" }));

  // Grid, then the locus region, gamut and marks.
  const xTicks = niceTicks(0, MAIN.xMax, 8);
  const yTicks = niceTicks(0, MAIN.yMax, 9);
  const gridLines = [
    ...xTicks.map((v) => element("line", { x1: xs(v), y1: ys(0), x2: xs(v), y2: ys(MAIN.yMax), stroke: "#ececec" })),
    ...yTicks.map((v) => element("line", { x1: xs(0), y1: ys(v), x2: xs(MAIN.xMax), y2: ys(v), stroke: "#ececec" })),
  ];
  parts.push(element("g", { class: "grid" }, gridLines.join("")));

  const locusPx = locus.map((q) => at(q));
  parts.push(element("polygon", { id: "locus-area", points: pointsAttribute(locusPx), fill: "#f3f1ec", stroke: "none" }));
  parts.push(element("polyline", { id: "spectrum-locus", points: pointsAttribute(locusPx), fill: "none", stroke: "#222222", "stroke-width": 1.6, "stroke-linejoin": "round" }));
  const first = locus[0];
  const last = locus[locus.length - 1];
  parts.push(element("line", { id: "purple-line", x1: xs(first.x), y1: ys(first.y), x2: xs(last.x), y2: ys(last.y), stroke: "#7b3f8c", "stroke-width": 1.4, "stroke-dasharray": "6 3" }));
  const purpleMid = at({ x: (first.x + last.x) / 2, y: (first.y + last.y) / 2 });
  const purpleAngle = (Math.atan2(ys(last.y) - ys(first.y), xs(last.x) - xs(first.x)) * 180) / Math.PI;
  parts.push(text(purpleMid[0], purpleMid[1] + 16, "purple line", { "font-size": 12, "text-anchor": "middle", fill: "#7b3f8c", transform: `rotate(${px(purpleAngle)} ${px(purpleMid[0])} ${px(purpleMid[1])})` }));

  // Wavelength ticks point away from the locus's inside (towards the outside of the horseshoe).
  const centre = at({ x: 1 / 3, y: 1 / 3 });
  const labels: string[] = [];
  for (const nm of LOCUS_LABELS_NM) {
    const i = locus.findIndex((q) => q.wavelengthNm === nm);
    if (i <= 0 || i >= locus.length - 1) continue;
    const [x0, y0] = locusPx[i];
    const tx = locusPx[i + 1][0] - locusPx[i - 1][0];
    const ty = locusPx[i + 1][1] - locusPx[i - 1][1];
    const len = Math.hypot(tx, ty) || 1;
    let nx = -ty / len;
    let ny = tx / len;
    if (nx * (x0 - centre[0]) + ny * (y0 - centre[1]) < 0) {
      nx = -nx;
      ny = -ny;
    }
    labels.push(element("circle", { id: `locus-${nm}nm`, cx: x0, cy: y0, r: 2.2, fill: "#222222" }));
    // Labels that would cross the y axis go inside the horseshoe instead.
    if (x0 + 30 * nx < MAIN.left) {
      nx = -nx;
      ny = -ny;
    }
    labels.push(element("line", { x1: x0, y1: y0, x2: x0 + 8 * nx, y2: y0 + 8 * ny, stroke: "#222222", "stroke-width": 1 }));
    const lx = x0 + 12 * nx;
    const ly = y0 + 12 * ny + 4;
    labels.push(text(lx, ly, `${nm}`, { "font-size": 11, "text-anchor": nx > 0.35 ? "start" : nx < -0.35 ? "end" : "middle", fill: "#222222" }));
  }
  parts.push(element("g", { id: "wavelength-labels" }, labels.join("")));
  parts.push(text(xs(0.03), ys(0.86), "wavelengths in nm (vacuum)", { "font-size": 11, fill: "#555555", "font-style": "italic" }));

  const xy = ([x, y]: readonly [number, number]): Chromaticity => ({ x, y });
  const primaries = spacePrimaries("srgb");
  const srgb = { red: xy(primaries.red), green: xy(primaries.green), blue: xy(primaries.blue), white: xy(primaries.white) };
  const tri = [srgb.red, srgb.green, srgb.blue];
  parts.push(element("polygon", { id: "srgb-gamut", points: pointsAttribute(tri.map((q) => at(q))), fill: "none", stroke: "#2e7d32", "stroke-width": 1.4, "stroke-dasharray": "8 4" }));
  const vertexLabel = (q: Chromaticity, name: string, dx: number, dy: number) =>
    element("circle", { id: `srgb-${name}`, cx: xs(q.x), cy: ys(q.y), r: 2.5, fill: "#2e7d32" }) +
    text(xs(q.x) + dx, ys(q.y) + dy, `sRGB ${name} (${q.x.toFixed(2)}, ${q.y.toFixed(2)})`, { "font-size": 11, fill: "#2e7d32", "text-anchor": dx < 0 ? "end" : "start" });
  parts.push(element("g", { id: "srgb-vertices" }, vertexLabel(srgb.red, "red", 6, -6) + vertexLabel(srgb.green, "green", -8, 4) + vertexLabel(srgb.blue, "blue", 8, 14)));

  // With the sun extinguished (on the horizon through a thick atmosphere) there is no white point: x, y are 0/0.
  const sunXy = chromaticity(p.sunWhite);
  const sun: Chromaticity | null = Number.isFinite(sunXy.x) && Number.isFinite(sunXy.y) ? sunXy : null;

  // The bow's path is small on the full diagram; a detail panel magnifies it.
  const bow = bowPoints(p);
  parts.push(element("polyline", { id: "bow-path", points: pointsAttribute(bow.map((q) => at(q))), fill: "none", stroke: "#111111", "stroke-width": 1.2 }));
  if (sun) parts.push(sunSymbol("sun-white", xs(sun.x), ys(sun.y)));

  // The detail panel frames the sun's white and the bow's path; with neither, the sRGB white.
  const framed = [...(sun ? [sun] : []), ...bow];
  if (framed.length === 0) framed.push(srgb.white);
  let minX = framed[0].x;
  let maxX = minX;
  let minY = framed[0].y;
  let maxY = minY;
  for (const q of framed) {
    minX = Math.min(minX, q.x);
    maxX = Math.max(maxX, q.x);
    minY = Math.min(minY, q.y);
    maxY = Math.max(maxY, q.y);
  }
  const span = Math.max(maxX - minX, maxY - minY, 0.01) * 1.4;
  const cx = (minX + maxX) / 2;
  const cy = (minY + maxY) / 2;
  const dx = linearScale([cx - span / 2, cx + span / 2], [DETAIL.left, DETAIL.left + DETAIL.size]);
  const dy = linearScale([cy - span / 2, cy + span / 2], [DETAIL.top + DETAIL.size, DETAIL.top]);
  const region = { x: xs(cx - span / 2), y: ys(cy + span / 2), w: xs(cx + span / 2) - xs(cx - span / 2), h: ys(cy - span / 2) - ys(cy + span / 2) };
  parts.push(element("rect", { id: "detail-region", x: region.x, y: region.y, width: region.w, height: region.h, fill: "none", stroke: "#b03a2e", "stroke-width": 1 }));
  parts.push(element("line", { x1: region.x + region.w, y1: region.y, x2: DETAIL.left, y2: DETAIL.top, stroke: "#b03a2e", "stroke-width": 0.7, "stroke-dasharray": "3 3" }));
  parts.push(element("line", { x1: region.x + region.w, y1: region.y + region.h, x2: DETAIL.left, y2: DETAIL.top + DETAIL.size, stroke: "#b03a2e", "stroke-width": 0.7, "stroke-dasharray": "3 3" }));

  parts.push(axis({ id: "x", scale: xs, ticks: xTicks, at: mainBottom, side: "bottom", label: "x" }));
  parts.push(axis({ id: "y", scale: ys, ticks: yTicks, at: MAIN.left, side: "left", label: "y" }));
  parts.push(element("rect", { x: MAIN.left, y: MAIN.top, width: mainRight - MAIN.left, height: mainBottom - MAIN.top, fill: "none", stroke: "#888888" }));

  // Detail panel.
  const detail: string[] = [];
  const detailBottom = DETAIL.top + DETAIL.size;
  detail.push(element("clipPath", { id: "detail-clip" }, element("rect", { x: DETAIL.left, y: DETAIL.top, width: DETAIL.size, height: DETAIL.size })));
  detail.push(element("rect", { x: DETAIL.left, y: DETAIL.top, width: DETAIL.size, height: DETAIL.size, fill: "#fbfaf7", stroke: "#b03a2e" }));
  const dTicks = niceTicks(cx - span / 2, cx + span / 2, 4);
  const dyTicks = niceTicks(cy - span / 2, cy + span / 2, 4);
  const inside: string[] = [];
  inside.push(...dTicks.map((v) => element("line", { x1: dx(v), y1: DETAIL.top, x2: dx(v), y2: detailBottom, stroke: "#ececec" })));
  inside.push(...dyTicks.map((v) => element("line", { x1: DETAIL.left, y1: dy(v), x2: DETAIL.left + DETAIL.size, y2: dy(v), stroke: "#ececec" })));
  // The path is drawn twice: thick in each sample's sRGB colour brought to full brightness (the diagram has no
  // luminance axis), then thin and dark for the exact positions.
  const colours = srgbColours(p);
  const c = p.colour.chromaticity;
  const segments: string[] = [];
  for (let i = 0; i + 1 < p.spectral.anglesDeg.length; i++) {
    if (![c[2 * i], c[2 * i + 1], c[2 * i + 2], c[2 * i + 3]].every(Number.isFinite)) continue;
    const k = Math.max(colours[3 * i], colours[3 * i + 1], colours[3 * i + 2]);
    const fill = k > 0 ? hexColour(colours[3 * i] / k, colours[3 * i + 1] / k, colours[3 * i + 2] / k) : "#000000";
    segments.push(element("line", { x1: dx(c[2 * i]), y1: dy(c[2 * i + 1]), x2: dx(c[2 * i + 2]), y2: dy(c[2 * i + 3]), stroke: fill, "stroke-width": 6, "stroke-linecap": "round" }));
  }
  inside.push(element("g", { id: "bow-path-colours" }, segments.join("")));
  inside.push(element("polyline", { id: "bow-path-detail", points: pointsAttribute(bow.map((q) => at(q, dx, dy))), fill: "none", stroke: "#111111", "stroke-width": 0.9, "stroke-linejoin": "round" }));
  const placer = new LabelPlacer({ x0: DETAIL.left + 2, y0: DETAIL.top + 2, x1: DETAIL.left + DETAIL.size - 2, y1: detailBottom - 2 });
  for (const q of bow) placer.block(dx(q.x), dy(q.y), 2);
  const labelled: string[] = [];
  const put = (x0: number, y0: number, label: string, size: number, attrs: Record<string, string | number>, force: boolean) => {
    const spot = placer.place(x0, y0, label.length, size, force);
    if (spot) labelled.push(text(spot.x, spot.y, label, { "font-size": size, "text-anchor": spot.anchor, ...attrs }));
  };
  const sunAt = sun ? at(sun, dx, dy) : null;
  if (sunAt) placer.block(sunAt[0], sunAt[1], 7);
  const d65 = at(srgb.white, dx, dy);
  if (observer === "cie1931-2") {
    labelled.push(element("circle", { id: "d65-white", cx: d65[0], cy: d65[1], r: 3.5, fill: "none", stroke: "#2e7d32", "stroke-width": 1.4 }));
    placer.block(d65[0], d65[1], 4);
  }
  const bowMarks: string[] = [];
  const bowLabels: [number, number, string, string][] = [];
  const markBow = (id: string, deg: number | null, label: string, colour: string) => {
    if (deg === null) return;
    const i = nearestSample(p, deg);
    const q = { x: c[2 * i], y: c[2 * i + 1] };
    if (!Number.isFinite(q.x)) return;
    bowMarks.push(marker(`${id}-detail`, dx(q.x), dy(q.y), colour));
    placer.block(dx(q.x), dy(q.y), 5);
    bowLabels.push([dx(q.x), dy(q.y), `${label} ${deg}°`, colour]);
    parts.push(marker(id, xs(q.x), ys(q.y), colour, 3));
  };
  markBow("bow-primary", p.bows.primaryDeg, "primary", "#b03a2e");
  markBow("bow-secondary", p.bows.secondaryDeg, "secondary", "#1f5fa8");
  const psiSpots = niceTicks(p.spectral.anglesDeg[0], p.spectral.anglesDeg[p.spectral.anglesDeg.length - 1], 6)
    .map((psi) => ({ psi, q: bow.find((b) => Math.abs(b.psi - psi) < 1e-6) }))
    .filter((s): s is { psi: number; q: { x: number; y: number; psi: number } } => s.q !== undefined);
  for (const { q } of psiSpots) placer.block(dx(q.x), dy(q.y), 2.5);
  if (sunAt) put(sunAt[0], sunAt[1], "sun", 11, { fill: "#7a5c00", "font-weight": "bold" }, true);
  for (const [bx, by, label, colour] of bowLabels) put(bx, by, label, 11, { fill: colour, "font-weight": "bold" }, true);
  if (observer === "cie1931-2") put(d65[0], d65[1], "D65 (sRGB white)", 10.5, { fill: "#2e7d32" }, false);
  const psiDots: string[] = [];
  for (const { psi, q } of psiSpots) {
    psiDots.push(element("circle", { cx: dx(q.x), cy: dy(q.y), r: 2.2, fill: "#ffffff", stroke: "#333333", "stroke-width": 1 }));
    put(dx(q.x), dy(q.y), `${psi}°`, 10, { fill: "#333333" }, false);
  }
  inside.push(...psiDots, ...bowMarks);
  if (sunAt) inside.push(sunSymbol("sun-white-detail", sunAt[0], sunAt[1]));
  inside.push(...labelled);
  detail.push(element("g", { "clip-path": "url(#detail-clip)" }, inside.join("")));
  detail.push(axis({ id: "detail-x", scale: dx, ticks: dTicks, at: detailBottom, side: "bottom", label: "x", fontSize: 10.5 }));
  detail.push(axis({ id: "detail-y", scale: dy, ticks: dyTicks, at: DETAIL.left, side: "left", label: "y", fontSize: 10.5 }));
  detail.push(text(DETAIL.left + DETAIL.size / 2, DETAIL.top - 8, "detail: the bow's colour path, ψ in degrees", { "font-size": 12, "text-anchor": "middle", fill: "#b03a2e" }));
  parts.push(element("g", { id: "detail-panel" }, detail.join("")));

  // Legend under the detail panel.
  const ly = detailBottom + 70;
  const legendRows: [string, string][] = [
    [element("line", { x1: 0, y1: 0, x2: 26, y2: 0, stroke: "#222222", "stroke-width": 1.6 }), `spectrum locus, ${LOCUS_DATA[observer].name}`],
    [element("line", { x1: 0, y1: 0, x2: 26, y2: 0, stroke: "#7b3f8c", "stroke-width": 1.4, "stroke-dasharray": "6 3" }), "purple line (ends of the locus)"],
    [element("line", { x1: 0, y1: 0, x2: 26, y2: 0, stroke: "#2e7d32", "stroke-width": 1.4, "stroke-dasharray": "8 4" }), "sRGB gamut (IEC 61966-2-1)"],
    [element("line", { x1: 0, y1: 0, x2: 26, y2: 0, stroke: "#111111", "stroke-width": 1.4 }), "bow's path over ψ, in its colour at full brightness"],
    [sunSymbol("legend-sun", 13, 0), "sun's direct light (white point)"],
    [marker("legend-primary", 13, 0, "#b03a2e") + marker("legend-secondary", 22, 0, "#1f5fa8"), "primary, secondary bow"],
  ];
  parts.push(
    element(
      "g",
      { id: "legend" },
      legendRows.map(([symbol, label], i) => element("g", { transform: `translate(${DETAIL.left - 20} ${ly + i * 22})` }, symbol + text(36, 4, label, { "font-size": 12, fill: "#222222" }))).join(""),
    ),
  );

  const hash = hashOf(p);
  const sources = [...chromaticityFigureSources(observer), ...sourcesOf(p)];
  const scenario = scenarioSentence(p.request, p.meta);
  const sunWhiteText = sun ? `x ${sun.x.toFixed(4)}, y ${sun.y.toFixed(4)}` : "none";
  const sunNote = sun
    ? `Sun's white: ${sunWhiteText}. Bow chromaticities are of the light as it arrives, before any white adaptation.`
    : "Sun's white: none. No direct sunlight reaches the drops at these wavelengths (the sun is on the horizon through this atmosphere), so the bow is black and has no path.";
  const lines = [...wrapText(scenario, CAPTION_CHARS), ...wrapText(sunNote, CAPTION_CHARS), `Content hash of the normalised request: ${hash}`];
  const caption = textBlock(24, mainBottom + 56, lines, 15, { "font-size": 11.5, fill: "#222222" });
  const sourceBlock = textBlock(24, caption.bottom + 6, ["Sources:", ...sources.flatMap((s) => wrapText(`• ${s}`, CAPTION_CHARS + 10))], 13, { "font-size": 10.5, fill: "#444444" });
  parts.push(element("g", { id: "caption" }, caption.markup));
  parts.push(element("g", { id: "sources" }, sourceBlock.markup));

  const desc =
    `${title}: the spectrum locus with wavelength labels, the purple line, the sRGB triangle, the sun's white point ` +
    `(${sunWhiteText}) and the colour path of the bow over ψ ${p.spectral.anglesDeg[0]}–${p.spectral.anglesDeg[p.spectral.anglesDeg.length - 1]}°. ` +
    `${scenario} Content hash ${hash}. Sources: ${sources.join("; ")}.`;
  return svgDocument({ width: WIDTH, height: sourceBlock.bottom + 18, title, desc, body: parts.join("\n") });
}
