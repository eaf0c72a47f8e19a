// Greedy placement of short labels beside points, so that neighbouring labels do not overprint each other.

export interface Box {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

export interface Placement {
  x: number;
  y: number;
  anchor: "start" | "end";
}

/** Width of a label in a sans-serif face: about 0.6 em per character (common practice for estimates). */
function labelBox(p: Placement, chars: number, fontSize: number): Box {
  const w = 0.6 * fontSize * chars;
  const x0 = p.anchor === "start" ? p.x : p.x - w;
  return { x0, y0: p.y - fontSize * 0.8, x1: x0 + w, y1: p.y + fontSize * 0.2 };
}

const overlaps = (a: Box, b: Box) => a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;

export class LabelPlacer {
  private readonly taken: Box[] = [];

  /** Labels must fit inside `bounds` (a clipped panel, say). */
  constructor(private readonly bounds?: Box) {}

  private fits(b: Box): boolean {
    const o = this.bounds;
    return !o || (b.x0 >= o.x0 && b.x1 <= o.x1 && b.y0 >= o.y0 && b.y1 <= o.y1);
  }

  /** Reserves the area around a drawn point. */
  block(x: number, y: number, radius: number): void {
    this.taken.push({ x0: x - radius, y0: y - radius, x1: x + radius, y1: y + radius });
  }

  /** First of eight positions around (x, y), near ones first, that is free; null when all overlap and `force` is false. */
  place(x: number, y: number, chars: number, fontSize: number, force = false, gap = 6): Placement | null {
    const candidates: Placement[] = [1, 2.5].flatMap((far) => [
      { x: x + gap * far, y: y - gap * far, anchor: "start" as const },
      { x: x + gap * far, y: y + gap * far + fontSize * 0.8, anchor: "start" as const },
      { x: x - gap * far, y: y - gap * far, anchor: "end" as const },
      { x: x - gap * far, y: y + gap * far + fontSize * 0.8, anchor: "end" as const },
    ]);
    const boxes = candidates.map((c) => labelBox(c, chars, fontSize));
    const free = candidates.find((_, i) => this.fits(boxes[i]) && !this.taken.some((t) => overlaps(t, boxes[i])));
    const inside = candidates.find((_, i) => this.fits(boxes[i]));
    const chosen = free ?? (force ? (inside ?? candidates[0]) : null);
    if (chosen) this.taken.push(labelBox(chosen, chars, fontSize));
    return chosen;
  }
}
