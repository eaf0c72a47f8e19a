// A small helper to build SVG without innerHTML (the page's policy forbids inline markup from strings).

const NS = "http://www.w3.org/2000/svg";

/** Creates an SVG element with attributes and children (strings become text nodes). */
export function svg(tag, attrs = {}, children = []) {
  const node = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) if (v !== undefined && v !== null) node.setAttribute(k, String(v));
  for (const child of children) node.append(typeof child === "string" ? document.createTextNode(child) : child);
  return node;
}

/** A linear map from a data interval onto a pixel interval. */
export function scale(d0, d1, p0, p1) {
  const k = (p1 - p0) / (d1 - d0 || 1);
  return (v) => p0 + (v - d0) * k;
}

/** Round tick values for an interval, about `count` of them. */
export function ticks(lo, hi, count) {
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}

export function fmt(v, digits = 1) {
  return Number.isFinite(v) ? v.toFixed(digits) : "–";
}
