// Linear and logarithmic axis maps, tick choice and axis markup.

import { element, text, px } from "./svg.js";

export interface Scale {
  readonly domain: readonly [number, number];
  readonly range: readonly [number, number];
  readonly log: boolean;
  (value: number): number;
  invert(pixel: number): number;
}

export function linearScale(domain: readonly [number, number], range: readonly [number, number]): Scale {
  const k = (range[1] - range[0]) / (domain[1] - domain[0]);
  const f = ((v: number) => range[0] + (v - domain[0]) * k) as Scale;
  return Object.assign(f, { domain, range, log: false, invert: (p: number) => domain[0] + (p - range[0]) / k });
}

export function logScale(domain: readonly [number, number], range: readonly [number, number]): Scale {
  const inner = linearScale([Math.log10(domain[0]), Math.log10(domain[1])], range);
  const f = ((v: number) => inner(Math.log10(v))) as Scale;
  return Object.assign(f, { domain, range, log: true, invert: (p: number) => 10 ** inner.invert(p) });
}

/** Round tick values at 1, 2 or 5 × 10ⁿ spacing, about `target` of them and at least three (Heckbert 1990, "Nice numbers for graph labels", Graphics Gems, 61–63). */
export function niceTicks(min: number, max: number, target = 6): number[] {
  const span = max - min;
  if (!(span > 0)) return [min];
  const raw = span / target;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * magnitude).find((s) => s >= raw) ?? 10 * magnitude;
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step - 1e-9) * step; v <= max + step * 1e-9; v += step) ticks.push(Number(v.toPrecision(12)));
  // An axis needs at least three labelled ticks to be read (and checked) unambiguously.
  return ticks.length < 3 && target < 40 ? niceTicks(min, max, 2 * target) : ticks;
}

/** 1, 2 and 5 × 10ⁿ inside [min, max]; with fewer than three of those, every integer multiple of 10ⁿ. */
export function logTicks(min: number, max: number): number[] {
  const pick = (mantissas: number[]) => {
    const out: number[] = [];
    for (let e = Math.floor(Math.log10(min)); e <= Math.ceil(Math.log10(max)); e++) {
      for (const m of mantissas) {
        const v = Number((m * 10 ** e).toPrecision(12));
        if (v >= min * (1 - 1e-9) && v <= max * (1 + 1e-9)) out.push(v);
      }
    }
    return out;
  };
  const coarse = pick([1, 2, 5]);
  return coarse.length >= 3 ? coarse : pick([1, 2, 3, 4, 5, 6, 7, 8, 9]);
}

export function tickLabel(value: number): string {
  const s = Number(value.toPrecision(6)).toString();
  return s.replace("-", "−");
}

export interface AxisOptions {
  /** Prefix of each tick's id: `${id}-${value}`; lets a reader recover the axis map from the drawing. */
  id: string;
  scale: Scale;
  ticks: readonly number[];
  /** Where the axis line sits across the other dimension. */
  at: number;
  side: "bottom" | "top" | "left" | "right";
  label?: string;
  format?: (v: number) => string;
  tickLength?: number;
  fontSize?: number;
  colour?: string;
}

/** Axis line, ticks (each a <line> with an id carrying its value) and labels. */
export function axis(o: AxisOptions): string {
  const len = o.tickLength ?? 6;
  const size = o.fontSize ?? 12;
  const colour = o.colour ?? "#333333";
  const format = o.format ?? tickLabel;
  const [r0, r1] = o.scale.range;
  const horizontal = o.side === "bottom" || o.side === "top";
  const dir = o.side === "bottom" || o.side === "right" ? 1 : -1;
  const parts: string[] = [];
  parts.push(
    horizontal
      ? element("line", { x1: r0, y1: o.at, x2: r1, y2: o.at, stroke: colour, "stroke-width": 1 })
      : element("line", { x1: o.at, y1: r0, x2: o.at, y2: r1, stroke: colour, "stroke-width": 1 }),
  );
  for (const v of o.ticks) {
    const p = o.scale(v);
    const id = `${o.id}-${Number(v.toPrecision(12))}`;
    if (horizontal) {
      parts.push(element("line", { id, class: "tick", x1: p, y1: o.at, x2: p, y2: o.at + dir * len, stroke: colour, "stroke-width": 1 }));
      parts.push(text(p, o.at + dir * (len + 3) + (dir > 0 ? size * 0.85 : 0), format(v), { "font-size": size, "text-anchor": "middle", fill: colour }));
    } else {
      parts.push(element("line", { id, class: "tick", x1: o.at, y1: p, x2: o.at + dir * len, y2: p, stroke: colour, "stroke-width": 1 }));
      parts.push(text(o.at + dir * (len + 3), p + size * 0.35, format(v), { "font-size": size, "text-anchor": dir > 0 ? "start" : "end", fill: colour }));
    }
  }
  if (o.label) {
    const mid = (r0 + r1) / 2;
    if (horizontal) {
      const y = o.at + dir * (len + size * 2.6) + (dir > 0 ? size * 0.3 : 0);
      parts.push(text(mid, y, o.label, { "font-size": size + 1, "text-anchor": "middle", fill: colour }));
    } else {
      const x = o.at + dir * (len + size * 3.6);
      parts.push(text(x, mid, o.label, { "font-size": size + 1, "text-anchor": "middle", fill: colour, transform: `rotate(${dir > 0 ? 90 : -90} ${px(x)} ${px(mid)})` }));
    }
  }
  return element("g", { class: `axis axis-${o.side}` }, parts.join(""));
}
