// Small string builders for self-contained SVG 1.1 documents.

/** Escapes the five XML special characters (XML 1.0 §2.4) for text and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[<>&"']/g, (c) => ({ "<": "&lt;", ">": "&gt;", "&": "&amp;", '"': "&quot;", "'": "&apos;" })[c]!);
}

/** A coordinate with two decimals: 1/100 px is below any display's resolution and keeps files small. */
export function px(v: number): string {
  return String(Math.round(v * 100) / 100);
}

export type Attributes = Record<string, string | number | undefined>;

function attributes(attrs: Attributes): string {
  return Object.entries(attrs)
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => ` ${k}="${escapeXml(typeof v === "number" ? px(v) : String(v))}"`)
    .join("");
}

export function element(name: string, attrs: Attributes, children?: string): string {
  return children === undefined ? `<${name}${attributes(attrs)}/>` : `<${name}${attributes(attrs)}>${children}</${name}>`;
}

export function text(x: number, y: number, content: string, attrs: Attributes = {}): string {
  return element("text", { x, y, ...attrs }, escapeXml(content));
}

export function pointsAttribute(points: readonly (readonly [number, number])[]): string {
  return points.map(([x, y]) => `${px(x)},${px(y)}`).join(" ");
}

/** Greedy word wrap at a character budget: SVG 1.1 has no automatic line breaking. */
export function wrapText(content: string, maxChars: number): string[] {
  const lines: string[] = [];
  let line = "";
  for (const word of content.split(/\s+/).filter((w) => w !== "")) {
    if (line !== "" && line.length + 1 + word.length > maxChars) {
      lines.push(line);
      line = word;
    } else line = line === "" ? word : `${line} ${word}`;
  }
  if (line !== "") lines.push(line);
  return lines;
}

/** Lines of caption text from a top y; returns the markup and the y below the last line. */
export function textBlock(x: number, top: number, lines: readonly string[], lineHeight: number, attrs: Attributes = {}): { markup: string; bottom: number } {
  const markup = lines.map((l, i) => text(x, top + (i + 1) * lineHeight, l, attrs)).join("");
  return { markup, bottom: top + lines.length * lineHeight };
}

export interface SvgDocument {
  width: number;
  height: number;
  title: string;
  desc: string;
  body: string;
}

export function svgDocument(doc: SvgDocument): string {
  return (
    `<?xml version="1.0" encoding="UTF-8"?>\n` +
    `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="${px(doc.width)}" height="${px(doc.height)}" ` +
    `viewBox="0 0 ${px(doc.width)} ${px(doc.height)}" font-family="sans-serif" role="img" aria-labelledby="figure-title figure-desc">\n` +
    `<title id="figure-title">${escapeXml(doc.title)}</title>\n` +
    `<desc id="figure-desc">${escapeXml(doc.desc)}</desc>\n` +
    `<rect x="0" y="0" width="${px(doc.width)}" height="${px(doc.height)}" fill="#ffffff"/>\n` +
    doc.body +
    `\n</svg>\n`
  );
}

/** sRGB triple in [0, 1] (encoded) as #rrggbb, 8 bits per channel (CSS Color Module Level 4, hex notation) with round-half-up (our choice). */
export function hexColour(r: number, g: number, b: number): string {
  const byte = (v: number) => Math.round(Math.min(1, Math.max(0, Number.isFinite(v) ? v : 0)) * 255).toString(16).padStart(2, "0");
  return `#${byte(r)}${byte(g)}${byte(b)}`;
}
