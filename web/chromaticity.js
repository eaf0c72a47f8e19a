// The bow's path on the CIE xy chromaticity diagram, with an enlarged inset around the path.

import { svg, scale, ticks, fmt } from "./svg.js";

/** Primaries (x, y) of each output space: IEC 61966-2-1 (sRGB), SMPTE EG 432-1 (Display P3), ITU-R BT.2020, ACES S-2014-004 (AP1). */
const PRIMARIES = {
  srgb: { name: "sRGB", xy: [[0.64, 0.33], [0.3, 0.6], [0.15, 0.06]] },
  "srgb-linear": { name: "sRGB", xy: [[0.64, 0.33], [0.3, 0.6], [0.15, 0.06]] },
  "display-p3": { name: "Display P3", xy: [[0.68, 0.32], [0.265, 0.69], [0.15, 0.06]] },
  rec2020: { name: "Rec. 2020", xy: [[0.708, 0.292], [0.17, 0.797], [0.131, 0.046]] },
  acescg: { name: "ACEScg", xy: [[0.713, 0.293], [0.165, 0.83], [0.128, 0.044]] },
};
/** D65 white, x = 0.3127, y = 0.3290 (IEC 61966-2-1). */
const D65 = [0.3127, 0.329];
const LABELLED_NM = new Set([460, 480, 490, 500, 510, 520, 540, 560, 580, 600, 620, 700]);

const PX_PER_UNIT = 460;
// x from −0.06 leaves room for the wavelength labels left of the locus near x = 0.
const X_FROM = -0.06;
const BOX = { left: 40, top: 14, width: (0.8 - X_FROM) * PX_PER_UNIT, height: 0.9 * PX_PER_UNIT };
const SIZE = { width: BOX.left + BOX.width + 14, height: BOX.top + BOX.height + 42 };
const INSET = { x: BOX.left + (0.5 - X_FROM) * PX_PER_UNIT, y: BOX.top + 22, size: 0.29 * PX_PER_UNIT };
/** Below this enlargement the inset would repeat the main diagram, so it is left out. */
const MIN_ZOOM = 1.6;

function pathOf(points, sx, sy, close = false) {
  return points.map(([x, y], i) => `${i ? "L" : "M"}${sx(x).toFixed(2)},${sy(y).toFixed(2)}`).join("") + (close ? "Z" : "");
}

/** Inset window around the samples at least a tenth as bright as the peak: the dim ones wander and matter little. */
function zoomWindow(xy, luminance) {
  const peak = Math.max(...luminance) || 1;
  let bright = xy.filter((_, i) => luminance[i] >= 0.1 * peak);
  if (bright.length < 2) bright = xy;
  const xs = bright.map((p) => p[0]);
  const ys = bright.map((p) => p[1]);
  const cx = (Math.min(...xs) + Math.max(...xs)) / 2;
  const cy = (Math.min(...ys) + Math.max(...ys)) / 2;
  const half = Math.max(Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys), 0.01) * 0.6;
  return { x0: cx - half, x1: cx + half, y0: cy - half, y1: cy + half };
}

function sampleDot(cx, cy, colours, i) {
  const rgb = `rgb(${colours.encoded[3 * i]},${colours.encoded[3 * i + 1]},${colours.encoded[3 * i + 2]})`;
  return svg("circle", { class: "sample", cx: cx.toFixed(2), cy: cy.toFixed(2), r: 2.4, fill: rgb });
}

/** The enlarged path, each sample a dot in its own colour, with the bows marked. */
function insetParts(xy, w, zoom, profile, colours, sx, sy) {
  const ix = scale(w.x0, w.x1, INSET.x, INSET.x + INSET.size);
  const iy = scale(w.y0, w.y1, INSET.y + INSET.size, INSET.y);
  const parts = [];
  parts.push(
    svg("rect", { class: "zoom-source", x: sx(w.x0), y: sy(w.y1), width: Math.max(sx(w.x1) - sx(w.x0), 2), height: Math.max(sy(w.y0) - sy(w.y1), 2) }),
    svg("line", { class: "zoom-leader", x1: sx(w.x1), y1: sy(w.y1), x2: INSET.x, y2: INSET.y + INSET.size }),
    svg("rect", { class: "inset", x: INSET.x, y: INSET.y, width: INSET.size, height: INSET.size }),
  );
  const inside = ([x, y]) => x >= w.x0 && x <= w.x1 && y >= w.y0 && y <= w.y1;
  const clipped = [];
  if (inside(D65)) clipped.push(svg("circle", { class: "white-point", cx: ix(D65[0]), cy: iy(D65[1]), r: 3 }));
  clipped.push(svg("path", { class: "bow-path thin", d: pathOf(xy, ix, iy) }));
  xy.forEach(([x, y], i) => {
    if (!inside([x, y])) return;
    clipped.push(sampleDot(ix(x), iy(y), colours, i));
  });
  const marks = [
    [profile.bows.primaryDeg, "circle"],
    [profile.bows.secondaryDeg, "rect"],
  ];
  for (const [deg, shape] of marks) {
    if (deg === null) continue;
    const i = profile.anglesDeg.reduce((best, a, k) => (Math.abs(a - deg) < Math.abs(profile.anglesDeg[best] - deg) ? k : best), 0);
    const [x, y] = xy[i];
    clipped.push(
      shape === "circle"
        ? svg("circle", { class: "bow-point", cx: ix(x), cy: iy(y), r: 5 })
        : svg("rect", { class: "bow-point", x: ix(x) - 4.5, y: iy(y) - 4.5, width: 9, height: 9 }),
    );
  }
  parts.push(
    svg("clipPath", { id: "inset-clip" }, [svg("rect", { x: INSET.x, y: INSET.y, width: INSET.size, height: INSET.size })]),
    svg("g", { "clip-path": "url(#inset-clip)" }, clipped),
    svg("rect", { class: "inset-legend-bg", x: INSET.x + 1, y: INSET.y + INSET.size - 19, width: INSET.size - 2, height: 18 }),
    svg("g", { class: "inset-legend", transform: `translate(${INSET.x + 6} ${INSET.y + INSET.size - 6})` }, [
      svg("circle", { class: "bow-point", cx: 5, cy: -4, r: 4.5 }),
      svg("text", { x: 14, y: 0 }, ["primary"]),
      svg("rect", { class: "bow-point", x: 66, y: -8, width: 8, height: 8 }),
      svg("text", { x: 80, y: 0 }, ["secondary"]),
    ]),
  );
  parts.push(
    svg("text", { class: "inset-caption", x: INSET.x, y: INSET.y - 6 }, [`enlarged ×${zoom.toFixed(zoom < 10 ? 1 : 0)}`]),
  );
  return parts;
}

export function drawChromaticity(container, profile, locus, colours) {
  const sx = scale(X_FROM, 0.8, BOX.left, BOX.left + BOX.width);
  const sy = scale(0, 0.9, BOX.top + BOX.height, BOX.top);
  const locusXy = locus.points.map((p) => [p.x, p.y]);
  const xy = profile.chromaticity;
  const parts = [];

  for (const t of ticks(0, 0.8, 8)) {
    parts.push(
      svg("line", { class: "grid", x1: sx(t), x2: sx(t), y1: sy(0), y2: sy(0.9) }),
      svg("text", { class: "tick", x: sx(t), y: sy(0) + 16, "text-anchor": "middle" }, [fmt(t, 1)]),
    );
  }
  for (const t of ticks(0, 0.9, 9)) {
    parts.push(
      svg("line", { class: "grid", x1: sx(X_FROM), x2: sx(0.8), y1: sy(t), y2: sy(t) }),
      svg("text", { class: "tick", x: sx(X_FROM) - 6, y: sy(t) + 4, "text-anchor": "end" }, [fmt(t, 1)]),
    );
  }
  parts.push(
    svg("path", { class: "locus", d: pathOf(locusXy, sx, sy, true) }),
    svg("text", { class: "axis-label", x: BOX.left + BOX.width / 2, y: SIZE.height - 6, "text-anchor": "middle" }, ["x"]),
    svg("text", { class: "axis-label", x: 8, y: BOX.top + BOX.height / 2, "text-anchor": "middle" }, ["y"]),
  );
  for (const p of locus.points) {
    if (!LABELLED_NM.has(p.wavelengthNm)) continue;
    const dx = p.x - D65[0];
    const dy = p.y - D65[1];
    const len = Math.hypot(dx, dy) || 1;
    const ox = (dx / len) * 16;
    const oy = (-dy / len) * 16;
    parts.push(
      svg("circle", { class: "locus-dot", cx: sx(p.x), cy: sy(p.y), r: 2 }),
      svg("text", { class: "tick", x: sx(p.x) + ox, y: sy(p.y) + oy + 4, "text-anchor": ox < -4 ? "end" : ox > 4 ? "start" : "middle" }, [
        String(p.wavelengthNm),
      ]),
    );
  }
  const gamut = PRIMARIES[profile.space];
  if (gamut) {
    parts.push(svg("path", { class: "gamut", d: pathOf(gamut.xy, sx, sy, true) }));
    parts.push(svg("text", { class: "gamut-label", x: sx(gamut.xy[0][0]) - 4, y: sy(gamut.xy[0][1]) - 8, "text-anchor": "end" }, [gamut.name]));
  }
  parts.push(
    svg("circle", { class: "white-point", cx: sx(D65[0]), cy: sy(D65[1]), r: 3 }),
    svg("text", { class: "tick", x: sx(D65[0]) - 6, y: sy(D65[1]) + 14, "text-anchor": "end" }, ["D65"]),
  );
  parts.push(svg("path", { class: "bow-path", d: pathOf(xy, sx, sy) }));

  const w = zoomWindow(xy, profile.luminance);
  const zoom = 0.29 / (w.x1 - w.x0);
  if (zoom >= MIN_ZOOM) parts.push(...insetParts(xy, w, zoom, profile, colours, sx, sy));
  else parts.push(...xy.map(([x, y], i) => sampleDot(sx(x), sy(y), colours, i)));

  const observer = locus.observer === "cie1964-10" ? "CIE 1964 10°" : "CIE 1931 2°";
  const root = svg("svg", { viewBox: `0 0 ${SIZE.width} ${SIZE.height}`, role: "img", "aria-labelledby": "chroma-svg-title chroma-svg-desc" }, [
    svg("title", { id: "chroma-svg-title" }, [`Chromaticity path of the bow on the ${observer} diagram`]),
    svg("desc", { id: "chroma-svg-desc" }, [
      `${xy.length} samples between x ${fmt(Math.min(...xy.map((p) => p[0])), 3)} and ${fmt(Math.max(...xy.map((p) => p[0])), 3)}, ` +
        `y ${fmt(Math.min(...xy.map((p) => p[1])), 3)} and ${fmt(Math.max(...xy.map((p) => p[1])), 3)}; the white point D65 is at 0.313, 0.329.`,
    ]),
    ...parts,
  ]);
  container.replaceChildren(root);
}
