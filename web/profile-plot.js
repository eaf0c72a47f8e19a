// Luminance and degree of polarisation against ψ, with the bows and the dark band between them marked.

import { svg, scale, ticks, fmt } from "./svg.js";

/** Shared with the strip above the plot (styles.css sets the strip's margins from these). */
export const PLOT = { width: 900, height: 300, left: 56, right: 56, top: 26, bottom: 46 };

function polyline(xs, ys, sx, sy) {
  return xs.map((x, i) => `${i ? "L" : "M"}${sx(x).toFixed(2)},${sy(ys[i]).toFixed(2)}`).join("");
}

export function drawProfilePlot(container, profile) {
  const { width, height, left, right, top, bottom } = PLOT;
  const angles = profile.anglesDeg;
  const from = angles[0];
  const to = angles[angles.length - 1];
  const peak = Math.max(...profile.luminance) || 1;
  const luminance = profile.luminance.map((v) => v / peak);
  const dopLow = Math.min(0, ...profile.polarisation);
  const sx = scale(from, to, left, width - right);
  const sy = scale(0, 1.05, height - bottom, top);
  const sp = scale(dopLow, 1.05, height - bottom, top);
  const { primaryDeg, secondaryDeg } = profile.bows;

  const parts = [];
  if (primaryDeg !== null && secondaryDeg !== null) {
    parts.push(
      svg("rect", { class: "dark-band", x: sx(primaryDeg), y: top, width: sx(secondaryDeg) - sx(primaryDeg), height: height - top - bottom }),
      svg("text", { class: "band-label", x: (sx(primaryDeg) + sx(secondaryDeg)) / 2, y: top + 14, "text-anchor": "middle" }, ["dark band"]),
    );
  }
  for (const t of ticks(from, to, 8)) {
    parts.push(
      svg("line", { class: "grid", x1: sx(t), x2: sx(t), y1: top, y2: height - bottom }),
      svg("text", { class: "tick", x: sx(t), y: height - bottom + 16, "text-anchor": "middle" }, [`${t}°`]),
    );
  }
  for (const t of ticks(0, 1, 5)) {
    parts.push(svg("text", { class: "tick", x: left - 8, y: sy(t) + 4, "text-anchor": "end" }, [fmt(t, 1)]));
  }
  for (const t of ticks(dopLow, 1, 5)) {
    parts.push(svg("text", { class: "tick dop", x: width - right + 8, y: sp(t) + 4 }, [fmt(t, 1)]));
  }
  parts.push(
    svg("line", { class: "axis", x1: left, x2: width - right, y1: height - bottom, y2: height - bottom }),
    svg("text", { class: "axis-label", x: (left + width - right) / 2, y: height - 8, "text-anchor": "middle" }, ["ψ, angle from the antisolar point"]),
    svg("text", { class: "axis-label", transform: `translate(14 ${(top + height - bottom) / 2}) rotate(-90)`, "text-anchor": "middle" }, ["luminance / peak"]),
    svg("text", { class: "axis-label dop", transform: `translate(${width - 10} ${(top + height - bottom) / 2}) rotate(90)`, "text-anchor": "middle" }, [
      "degree of polarisation",
    ]),
    svg("path", { class: "line-dop", d: polyline(angles, profile.polarisation, sx, sp) }),
    svg("path", { class: "line-luminance", d: polyline(angles, luminance, sx, sy) }),
  );
  for (const [deg, name] of [
    [primaryDeg, "primary"],
    [secondaryDeg, "secondary"],
  ]) {
    if (deg === null) continue;
    parts.push(
      svg("line", { class: "bow-mark", x1: sx(deg), x2: sx(deg), y1: top - 4, y2: height - bottom }),
      svg("text", { class: "bow-label", x: sx(deg), y: top - 8, "text-anchor": "middle" }, [`${name} ${fmt(deg, 1)}°`]),
    );
  }
  const summary =
    `Luminance and degree of polarisation from ${from}° to ${to}°. ` +
    (primaryDeg !== null ? `Primary bow at ${fmt(primaryDeg, 1)}°. ` : "No primary bow found. ") +
    (secondaryDeg !== null ? `Secondary bow at ${fmt(secondaryDeg, 1)}°. ` : "No secondary bow found. ") +
    `Polarisation ranges from ${fmt(Math.min(...profile.polarisation), 2)} to ${fmt(Math.max(...profile.polarisation), 2)}.`;
  const root = svg("svg", { viewBox: `0 0 ${width} ${height}`, role: "img", "aria-labelledby": "plot-title plot-desc" }, [
    svg("title", { id: "plot-title" }, ["Luminance and polarisation against ψ"]),
    svg("desc", { id: "plot-desc" }, [summary]),
    ...parts,
  ]);
  container.replaceChildren(root);
}
