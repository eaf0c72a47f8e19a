import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdirSync, writeFileSync } from "node:fs";
import request from "supertest";
import sharp from "sharp";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../../http/app.js";
import { profileOf } from "../../helpers/profile.js";
import { profileSvg } from "../../../lib/figures/profile-figure.js";
import { chromaticitySvg } from "../../../lib/figures/chromaticity-figure.js";
import { sizeMapSvg, sizeMapRaster, logSpacedRadii } from "../../../lib/figures/size-map-figure.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { requestHash, type ProfileResult } from "../../../pipeline/compute/profile.js";

const ARTIFACTS = new URL("../../../test-artifacts/", import.meta.url);

/** Rasterises an SVG with sharp (librsvg) into test-artifacts/ for a human to look at; librsvg also rejects malformed XML. */
async function saveRender(name: string, svg: string): Promise<{ width: number; height: number }> {
  mkdirSync(ARTIFACTS, { recursive: true });
  writeFileSync(new URL(`${name}.svg`, ARTIFACTS), svg);
  const png = await sharp(Buffer.from(svg)).png().toBuffer();
  writeFileSync(new URL(`${name}.png`, ARTIFACTS), png);
  const meta = await sharp(png).metadata();
  return { width: meta.width!, height: meta.height! };
}

// ---- A small XML 1.0 well-formedness check (elements nest, attributes quoted and unique, only the predefined or numeric
// entity references, one root). Enough for the documents these builders write: no DOCTYPE, CDATA or comments.
interface XmlElement {
  name: string;
  attrs: Record<string, string>;
  children: XmlElement[];
  text: string;
}

function decodeEntities(s: string): string {
  return s.replace(/&(#x[0-9a-fA-F]+|#[0-9]+|lt|gt|amp|quot|apos);/g, (_, e: string) =>
    e[0] === "#" ? String.fromCodePoint(e[1] === "x" ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10)) : { lt: "<", gt: ">", amp: "&", quot: '"', apos: "'" }[e]!,
  );
}

function checkText(s: string): void {
  if (/&(?!(#x[0-9a-fA-F]+|#[0-9]+|lt|gt|amp|quot|apos);)/.test(s)) throw new Error(`bad entity reference in: ${s.slice(0, 60)}`);
  if (s.includes("<")) throw new Error("raw < in character data");
}

function parseXml(xml: string): XmlElement {
  let i = 0;
  const stack: XmlElement[] = [];
  let root: XmlElement | undefined;
  if (xml.startsWith("<?xml")) i = xml.indexOf("?>") + 2;
  const name = /^[A-Za-z_:][-A-Za-z0-9_:.]*/;
  while (i < xml.length) {
    const lt = xml.indexOf("<", i);
    const chunk = lt < 0 ? xml.slice(i) : xml.slice(i, lt);
    checkText(chunk);
    if (stack.length) stack[stack.length - 1].text += decodeEntities(chunk);
    else if (chunk.trim() !== "") throw new Error("text outside the root element");
    if (lt < 0) break;
    const gt = xml.indexOf(">", lt);
    if (gt < 0) throw new Error("unterminated tag");
    const tag = xml.slice(lt + 1, gt);
    i = gt + 1;
    if (tag.startsWith("/")) {
      const open = stack.pop();
      if (!open || open.name !== tag.slice(1).trim()) throw new Error(`</${tag.slice(1)}> closes ${open?.name ?? "nothing"}`);
      if (!stack.length) root = open;
      continue;
    }
    const selfClosing = tag.endsWith("/");
    const body = selfClosing ? tag.slice(0, -1) : tag;
    const m = name.exec(body);
    if (!m) throw new Error(`bad tag <${tag.slice(0, 20)}>`);
    const el: XmlElement = { name: m[0], attrs: {}, children: [], text: "" };
    let rest = body.slice(m[0].length);
    const attr = /^\s+([A-Za-z_:][-A-Za-z0-9_:.]*)="([^"<]*)"/;
    for (let a = attr.exec(rest); a; a = attr.exec(rest)) {
      if (a[1] in el.attrs) throw new Error(`duplicate attribute ${a[1]}`);
      checkText(a[2]);
      el.attrs[a[1]] = decodeEntities(a[2]);
      rest = rest.slice(a[0].length);
    }
    if (rest.trim() !== "") throw new Error(`malformed attributes in <${m[0]}>: ${rest.slice(0, 40)}`);
    if (stack.length) stack[stack.length - 1].children.push(el);
    else if (root) throw new Error("more than one root element");
    if (selfClosing) {
      if (!stack.length) root = el;
    } else stack.push(el);
  }
  if (stack.length || !root) throw new Error("unclosed elements at the end");
  return root;
}

function all(el: XmlElement): XmlElement[] {
  return [el, ...el.children.flatMap(all)];
}
function byId(root: XmlElement, id: string): XmlElement {
  const found = all(root).find((e) => e.attrs.id === id);
  if (!found) throw new Error(`no element #${id}`);
  return found;
}
function textContent(el: XmlElement): string {
  return el.text + el.children.map(textContent).join("");
}
function points(el: XmlElement): [number, number][] {
  return el.attrs.points.split(" ").map((p) => p.split(",").map(Number) as [number, number]);
}

/** The axis map recovered from the drawing: tick ids carry their values, tick lines their pixel positions. */
function axisMap(root: XmlElement, prefix: string, coordinate: "x1" | "y1"): ((pixel: number) => number) & { perPixel: number } {
  const ticks = all(root)
    .filter((e) => e.attrs.class === "tick" && e.attrs.id?.startsWith(`${prefix}-`))
    .map((e) => ({ value: Number(e.attrs.id.slice(prefix.length + 1)), pixel: Number(e.attrs[coordinate]) }));
  expect(ticks.length).toBeGreaterThanOrEqual(3);
  const a = ticks[0];
  const b = ticks[ticks.length - 1];
  const perPixel = (b.value - a.value) / (b.pixel - a.pixel);
  // The map must be linear through every tick, not just the two used (to the 0.01 px the coordinates are written with).
  for (const t of ticks) expect(Math.abs(a.value + (t.pixel - a.pixel) * perPixel - t.value)).toBeLessThan(0.011 * Math.abs(perPixel));
  return Object.assign((pixel: number) => a.value + (pixel - a.pixel) * perPixel, { perPixel: Math.abs(perPixel) });
}

describe("XML check used below", () => {
  it("rejects malformed documents, so a pass means something", () => {
    expect(() => parseXml('<svg><g></svg>')).toThrow();
    expect(() => parseXml('<svg a="1" a="2"/>')).toThrow();
    expect(() => parseXml("<svg>a & b</svg>")).toThrow();
    expect(() => parseXml("<svg x=1/>")).toThrow();
    expect(() => parseXml("<svg/><svg/>")).toThrow();
    expect(parseXml('<svg a="&lt;&amp;"><t>x &gt; y</t></svg>').children[0].text).toBe("x > y");
  });
});

// Cheap scenarios: the figures are checked here, the physics in test/pipeline/compute/profile-bows.test.ts.
const showerBody = { angles: { fromDeg: 30, toDeg: 60, stepDeg: 0.2 }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };

let shower: ProfileResult;
beforeAll(async () => {
  shower = await profileOf(showerBody);
});

describe("profileSvg", () => {
  it("is well-formed SVG 1.1 with title, desc, curves, strip, bows, axes with units and a caption with hash and sources", async () => {
    const svg = profileSvg(shower);
    const root = parseXml(svg);
    expect(root.name).toBe("svg");
    expect(root.attrs.xmlns).toBe("http://www.w3.org/2000/svg");
    expect(root.attrs.version).toBe("1.1");
    expect(root.attrs.viewBox).toMatch(/^0 0 \d+(\.\d+)? \d+(\.\d+)?$/);
    expect(svg).not.toMatch(/<script|javascript:|<foreignObject/i);
    const title = all(root).find((e) => e.name === "title")!;
    const desc = all(root).find((e) => e.name === "desc")!;
    expect(title.text).toMatch(/profile/i);
    const hash = String(shower.meta.hash);
    expect(hash).toMatch(/^[0-9a-f]{32}$/);
    expect(desc.text).toContain(hash);
    for (const s of shower.meta.sources as string[]) expect(desc.text).toContain(s);
    expect(textContent(byId(root, "caption"))).toContain(hash);
    expect(textContent(byId(root, "sources"))).toContain("Lorenz–Mie theory");

    const n = shower.spectral.anglesDeg.length;
    expect(byId(root, "colour-strip").children).toHaveLength(n);
    expect(points(byId(root, "luminance-curve"))).toHaveLength(n);
    expect(points(byId(root, "polarisation-curve"))).toHaveLength(n);
    expect(shower.bows.primaryDeg).not.toBeNull();
    expect(shower.bows.secondaryDeg).not.toBeNull();
    const psi = axisMap(root, "psi", "x1");
    expect(psi(Number(byId(root, "primary-bow").attrs.x1))).toBeCloseTo(shower.bows.primaryDeg!, 3);
    expect(psi(Number(byId(root, "secondary-bow").attrs.x1))).toBeCloseTo(shower.bows.secondaryDeg!, 3);
    expect(textContent(byId(root, "dark-band-label"))).toBe("Alexander's dark band");
    const band = byId(root, "dark-band");
    expect(psi(Number(band.attrs.x))).toBeCloseTo(shower.bows.primaryDeg!, 3);
    expect(psi(Number(band.attrs.x) + Number(band.attrs.width))).toBeCloseTo(shower.bows.secondaryDeg!, 3);

    // The luminance curve read back through the left axis equals the profile (0.01 px of a ~300 px axis: < 1e-4).
    const lum = axisMap(root, "luminance", "y1");
    points(byId(root, "luminance-curve")).forEach(([, y], i) => expect(Math.abs(lum(y) - shower.colour.luminance[i])).toBeLessThan(1e-4));
    const pol = axisMap(root, "polarisation", "y1");
    points(byId(root, "polarisation-curve")).forEach(([, y], i) => expect(Math.abs(pol(y) - shower.colour.polarisation[i])).toBeLessThan(1e-4));
    for (const label of ["ψ, angle from the antisolar point (degrees)", "luminance (relative, peak = 1)", "degree of linear polarisation"]) {
      expect(svg).toContain(label);
    }
    const size = await saveRender("figure-profile", svg);
    expect(size.width).toBe(960);
  });

  it("draws a non-sRGB request's strip in sRGB: the same colours the service renders when asked for sRGB", async () => {
    const p3 = await profileOf({ ...showerBody, output: { space: "display-p3" } });
    const strip = byId(parseXml(profileSvg(p3)), "colour-strip").children.map((r) => r.attrs.fill);
    const reference = byId(parseXml(profileSvg(shower)), "colour-strip").children.map((r) => r.attrs.fill);
    // One 8-bit code of slack: the two paths round separately, so a value near a half-code may land either side.
    let worst = 0;
    strip.forEach((hex, i) => {
      for (let c = 0; c < 3; c++) {
        worst = Math.max(worst, Math.abs(parseInt(hex.slice(1 + 2 * c, 3 + 2 * c), 16) - parseInt(reference[i].slice(1 + 2 * c, 3 + 2 * c), 16)));
      }
    });
    expect(worst).toBeLessThanOrEqual(1);
    expect(profileSvg(p3)).toContain("the request asked for display-p3");
  });
});

describe("figures of unusual requests", () => {
  it("stay well-formed with no bows in range, physical units, the 10° observer and a linear output space", async () => {
    const odd = await profileOf({
      drops: { kind: "monodisperse", radiusUm: 1000 },
      angles: { fromDeg: 20, toDeg: 30, stepDeg: 0.5 },
      spectral: { fromNm: 380, toNm: 780, stepNm: 20 },
      observer: "cie1964-10",
      output: { space: "acescg", normalise: "physical" },
    });
    expect(odd.bows).toEqual({ primaryDeg: null, secondaryDeg: null });
    const profile = profileSvg(odd);
    const root = parseXml(profile);
    expect(profile).toContain("luminance (cd/m²)");
    expect(all(root).some((e) => e.attrs.id === "dark-band")).toBe(false);
    expect(byId(root, "colour-strip").children).toHaveLength(21);
    const chroma = chromaticitySvg(odd);
    expect(all(parseXml(chroma)).find((e) => e.name === "desc")!.text).toContain("10.25039/CIE.DS.sqksu2n5");
    // CIE 1964 10° locus at 520 nm: (0.12524, 0.81019), computed from CIE data set 10.25039/CIE.DS.sqksu2n5 (docs/checks.md).
    const r = parseXml(chroma);
    const dot = byId(r, "locus-520nm");
    const fx = axisMap(r, "x", "x1");
    const fy = axisMap(r, "y", "y1");
    expect(Math.abs(fx(Number(dot.attrs.cx)) - 0.12524)).toBeLessThan(5e-6 + 0.011 * fx.perPixel);
    expect(Math.abs(fy(Number(dot.attrs.cy)) - 0.81019)).toBeLessThan(5e-6 + 0.011 * fy.perPixel);
    await saveRender("figure-profile-unusual", profile);
    await saveRender("figure-chromaticity-unusual", chroma);
  });

  it("draw no white point and no path, and say why, when the atmosphere extinguishes the sun on the horizon", async () => {
    // Ångström β 2, α 4 at air mass ~38 (Kasten & Young 1989 at 0°): exp(−m τ) underflows to 0 over 380–460 nm.
    const dark = await profileOf({
      drops: { kind: "monodisperse", radiusUm: 5, numberPerM3: 1 },
      sun: { spectrum: { kind: "astm-g173", column: "extraterrestrial" }, elevationDeg: 0, discDeg: 0, atmosphere: { attenuate: "always", angstromBeta: 2, angstromAlpha: 4 } },
      angles: { fromDeg: 30, toDeg: 31, stepDeg: 0.1 },
      spectral: { fromNm: 380, toNm: 460, stepNm: 20 },
    });
    expect(dark.sunWhite.Y).toBe(0);
    const svg = chromaticitySvg(dark);
    expect(svg).not.toMatch(/NaN|Infinity|undefined/);
    const root = parseXml(svg);
    expect(all(root).some((e) => e.attrs.id === "sun-white" || e.attrs.id === "sun-white-detail")).toBe(false);
    expect(byId(root, "bow-path").attrs.points).toBe("");
    expect(all(root).find((e) => e.name === "desc")!.text).toContain("sun's white point (none)");
    expect(svg).toContain("No direct sunlight reaches the drops");
  });
});

describe("chromaticitySvg", () => {
  it("puts the spectrum locus where CIE's tables put it (CIE 2019 1 nm data sets) and the sRGB triangle at IEC 61966-2-1's primaries", async () => {
    const svg = chromaticitySvg(shower);
    const root = parseXml(svg);
    const fx = axisMap(root, "x", "x1");
    const fy = axisMap(root, "y", "y1");
    // x = x̄/(x̄+ȳ+z̄), y = ȳ/(…) computed from the CIE 2019 1 nm data set, 5 decimals (±5e-6; docs/checks.md); the drawing adds
    // ≤ 0.01 px (point and tick rounding) at 700 px per unit (±1.5e-5): tolerance 2.2e-5.
    const tol = 5e-6 + 0.011 * fx.perPixel;
    expect(tol).toBeLessThan(2.2e-5);
    const published: [number, number, number][] = [
      [460, NaN, NaN],
      [500, 0.00817, 0.53842],
      [520, 0.0743, 0.8338],
      [580, 0.51249, 0.48659],
      [600, 0.62704, 0.37249],
      [620, 0.6915, 0.30834],
      [700, 0.73469, 0.26531],
    ];
    for (const [nm, x, y] of published) {
      const dot = byId(root, `locus-${nm}nm`);
      if (Number.isNaN(x)) continue;
      expect(Math.abs(fx(Number(dot.attrs.cx)) - x)).toBeLessThan(tol);
      expect(Math.abs(fy(Number(dot.attrs.cy)) - y)).toBeLessThan(tol);
    }
    // The locus polyline passes through 400 and 450 nm too (same computed locus), at 1 nm steps from 360 nm.
    const locus = points(byId(root, "spectrum-locus"));
    expect(locus).toHaveLength(471);
    for (const [nm, x, y] of [
      [400, 0.17334, 0.0048],
      [450, 0.15664, 0.0177],
      [550, 0.3016, 0.69231],
    ]) {
      const [px, py] = locus[nm - 360];
      expect(Math.abs(fx(px) - x)).toBeLessThan(tol);
      expect(Math.abs(fy(py) - y)).toBeLessThan(tol);
    }
    // The purple line joins the two ends of the locus.
    const purple = byId(root, "purple-line");
    expect([Number(purple.attrs.x1), Number(purple.attrs.y1)]).toEqual(locus[0]);
    expect([Number(purple.attrs.x2), Number(purple.attrs.y2)]).toEqual(locus[locus.length - 1]);

    // IEC 61966-2-1:1999 primaries R (0.64, 0.33), G (0.30, 0.60), B (0.15, 0.06) (ITU-R BT.709-6's primaries; as in colour-science's sRGB data set, which cites both).
    const tri = points(byId(root, "srgb-gamut")).map(([px, py]) => [fx(px), fy(py)]);
    const iec = [
      [0.64, 0.33],
      [0.3, 0.6],
      [0.15, 0.06],
    ];
    tri.forEach(([x, y], i) => {
      expect(Math.abs(x - iec[i][0])).toBeLessThan(0.011 * fx.perPixel);
      expect(Math.abs(y - iec[i][1])).toBeLessThan(0.011 * fy.perPixel);
    });

    // Attribution of the CIE data (CC BY-SA 4.0) in <desc> and caption; hash and sources as well.
    const desc = all(root).find((e) => e.name === "desc")!.text;
    expect(desc).toContain("CC BY-SA 4.0");
    expect(desc).toContain("10.25039/CIE.DS.xvudnb9b");
    expect(textContent(byId(root, "sources"))).toContain("CC BY-SA 4.0");
    expect(desc).toContain(String(shower.meta.hash));
    for (const nm of [460, 480, 500, 520, 540, 560, 580, 600, 620, 700]) expect(svg).toContain(`>${nm}</text>`);
    await saveRender("figure-chromaticity", svg);
  });

  it("plots the bow's path at the profile's own chromaticities, in the diagram and in the detail panel", () => {
    const root = parseXml(chromaticitySvg(shower));
    const c = shower.colour.chromaticity;
    const n = shower.spectral.anglesDeg.length;
    for (const [id, prefix] of [
      ["bow-path", ""],
      ["bow-path-detail", "detail-"],
    ] as const) {
      const fx = axisMap(root, `${prefix}x`, "x1");
      const fy = axisMap(root, `${prefix}y`, "y1");
      const pts = points(byId(root, id));
      expect(pts).toHaveLength(n);
      let worst = 0;
      pts.forEach(([px, py], i) => (worst = Math.max(worst, Math.abs(fx(px) - c[2 * i]), Math.abs(fy(py) - c[2 * i + 1]))));
      // Coordinates and tick positions are written to 0.01 px: ≤ 0.005 px for the point plus ≤ 0.005 px for the axis map.
      expect(worst).toBeLessThan(0.011 * Math.max(fx.perPixel, fy.perPixel));
      expect(fx.perPixel).toBeLessThan(2e-3);
    }
    const primary = shower.spectral.anglesDeg.findIndex((a) => Math.abs(a - shower.bows.primaryDeg!) < 1e-9);
    const marker = byId(root, "bow-primary-detail");
    const fx = axisMap(root, "detail-x", "x1");
    expect(Math.abs(fx(Number(marker.attrs.cx)) - c[2 * primary])).toBeLessThan(0.011 * fx.perPixel);
  });

  it("marks the sun's white at D65 when the sun is CIE D65 (CIE 015:2018: 0.31272, 0.32903 from 5 nm sums)", async () => {
    const d65 = await profileOf({
      drops: { kind: "monodisperse", radiusUm: 500 },
      sun: { spectrum: { kind: "cie-d65" } },
      angles: { fromDeg: 38, toDeg: 56, stepDeg: 0.5 },
      spectral: { fromNm: 380, toNm: 780, stepNm: 5 },
    });
    const root = parseXml(chromaticitySvg(d65));
    const fx = axisMap(root, "detail-x", "x1");
    const fy = axisMap(root, "detail-y", "y1");
    const sun = byId(root, "sun-white-detail").children[0];
    // Computed 0.312721, 0.329031 at 5 nm (docs/checks.md); allow the published 5-decimal rounding plus 0.01 px of drawing.
    expect(Math.abs(fx(Number(sun.attrs.cx)) - 0.31272)).toBeLessThan(5e-6 + 0.011 * fx.perPixel);
    expect(Math.abs(fy(Number(sun.attrs.cy)) - 0.32903)).toBeLessThan(5e-6 + 0.011 * fy.perPixel);
    expect(5e-6 + 0.011 * Math.max(fx.perPixel, fy.perPixel)).toBeLessThan(3e-5);
  });
});

describe("sizeMapSvg and sizeMapRaster", () => {
  it("draws one cell per (radius, angle), a log radius axis and a raster with the largest radius on top", async () => {
    const radiiUm = logSpacedRadii(20, 2000, 5);
    // Log spacing: 20, 63.2, 200, 632, 2000 µm.
    expect(Array.from(radiiUm, (r) => Number(r.toPrecision(3)))).toEqual([20, 63.2, 200, 632, 2000]);
    const rows = await Promise.all(
      Array.from(radiiUm, (radiusUm) => profileOf({ ...showerBody, angles: { fromDeg: 30, toDeg: 60, stepDeg: 0.5 }, drops: { kind: "monodisperse", radiusUm } })),
    );
    const na = rows[0].spectral.anglesDeg.length;
    const srgb = new Float64Array(rows.length * na * 3);
    rows.forEach((r, i) => srgb.set(r.colour.rgb, i * na * 3));
    const map = { radiiUm, anglesDeg: rows[0].spectral.anglesDeg, srgb, bows: rows.map((r) => r.bows), scenario: "Scenario: test.", hash: "0123abcd", sources: ["a source"] };
    const svg = sizeMapSvg(map);
    const root = parseXml(svg);
    expect(byId(root, "size-map-cells").children).toHaveLength(rows.length * na);
    // The radius axis is logarithmic: equal pixel steps per decade.
    const ticks = ["radius-20", "radius-200", "radius-2000"].map((id) => Number(byId(root, id).attrs.y1));
    expect(ticks[0] - ticks[1]).toBeCloseTo(ticks[1] - ticks[2], 1);
    expect(svg).toContain("drop radius (µm, logarithmic scale)");
    expect(svg).toContain("row peak = 1");
    expect(svg).toContain("Lee 1998, Applied Optics 37, 1506");
    expect(svg).not.toContain("Lee 1991");
    const raster = sizeMapRaster(map);
    expect([raster.width, raster.height]).toEqual([na, 5]);
    // Top raster row = largest radius: its first pixel equals row 4's first colour.
    expect(Array.from(raster.pixels.slice(0, 3))).toEqual(Array.from(rows[4].colour.rgb.slice(0, 3), (v) => Math.round(Math.min(1, Math.max(0, v)) * 255)));
    await saveRender("figure-size-map-small", svg);
  });
});

describe("figure routes", () => {
  let app: FastifyInstance;
  // Kernels on the main thread (no build step needed), so the event-loop guard must not count them as overload.
  beforeAll(async () => {
    app = await buildApp({ config: { cacheDir: "", workers: 0, maxEventLoopDelayMs: 600_000 } });
    await app.ready();
  });
  afterAll(async () => app.close());

  const binary = (path: string) =>
    request(app.server)
      .post(path)
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("end", () => cb(null, Buffer.concat(chunks)));
      });

  // Large drops (Airy theory) on a coarse grid: the HTTP layer is under test here, the drawing above.
  const httpBody = { drops: { kind: "monodisperse", radiusUm: 1000 }, angles: { fromDeg: 36, toDeg: 56, stepDeg: 0.25 }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };

  it("POST /v1/figure/chromaticity answers SVG with the request's content hash in a header and in the figure", async () => {
    const res = await binary("/v1/figure/chromaticity").send(httpBody);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^image\/svg\+xml/);
    const hash = requestHash(profileRequestSchema.parse(httpBody));
    expect(res.headers["x-antisolar-hash"]).toBe(hash);
    const sources: string[] = JSON.parse(res.headers["x-antisolar-sources"]);
    expect(sources[0]).toMatch(/CIE 1931 2.*CC BY-SA 4\.0/);
    expect(sources.some((s) => /IAPWS/.test(s))).toBe(true);
    const svg = (res.body as Buffer).toString("utf8");
    expect(all(parseXml(svg)).find((e) => e.name === "desc")!.text).toContain(hash);
  });

  it("POST /v1/profile?format=svg answers the profile figure", async () => {
    const res = await binary("/v1/profile?format=svg").send(httpBody);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^image\/svg\+xml/);
    expect(res.headers["x-antisolar-hash"]).toBe(requestHash(profileRequestSchema.parse(httpBody)));
    expect((res.body as Buffer).toString("utf8")).toContain('id="colour-strip"');
  });

  it("POST /v1/figure/size-map renders the default {} as SVG, and as PNG of rows × angles", async () => {
    const res = await binary("/v1/figure/size-map").send({});
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^image\/svg\+xml/);
    expect(res.headers["x-antisolar-hash"]).toMatch(/^[0-9a-f]{32}$/);
    const svg = (res.body as Buffer).toString("utf8");
    const root = parseXml(svg);
    // Defaults: 24 radii × 121 angles (30–60° by 0.25°).
    expect(byId(root, "size-map-cells").children).toHaveLength(24 * 121);
    expect(svg).toContain(res.headers["x-antisolar-hash"]);
    expect(JSON.parse(res.headers["x-antisolar-sources"])[0]).toMatch(/Lee 1998, Applied Optics 37, 1506/);
    await saveRender("figure-size-map", svg);

    const png = await binary("/v1/figure/size-map?format=png").send({ radiusSteps: 6, angles: { fromDeg: 35, toDeg: 55, stepDeg: 0.5 } });
    expect(png.status).toBe(200);
    expect(png.headers["content-type"]).toBe("image/png");
    const meta = await sharp(png.body as Buffer).metadata();
    expect([meta.width, meta.height, meta.channels]).toEqual([41, 6, 3]);
    expect(JSON.parse(png.headers["x-antisolar-axes"]).radiusUm.count).toBe(6);
    writeFileSync(new URL("figure-size-map-raw.png", ARTIFACTS), png.body as Buffer);
  });

  it("rejects bad size-map requests with the API's error shape", async () => {
    const tooMany = await request(app.server).post("/v1/figure/size-map").send({ radiusSteps: 65 });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.field).toBe("radiusSteps");
    const typo = await request(app.server).post("/v1/figure/size-map").send({ radiusStep: 10 });
    expect(typo.status).toBe(400);
    const reversed = await request(app.server).post("/v1/figure/size-map").send({ radiusFromUm: 500, radiusToUm: 100 });
    expect(reversed.status).toBe(400);
    expect(reversed.body.field).toBe("radiusToUm");
    // Sea water's index is defined for 400–700 nm only (Quan & Fry 1995): the row's own rule applies.
    const salty = await request(app.server).post("/v1/figure/size-map").send({ water: { salinityPsu: 35 } });
    expect(salty.status).toBe(400);
    const costly = await request(app.server)
      .post("/v1/figure/size-map")
      .send({ method: "mie", radiusFromUm: 1000, radiusToUm: 3000, radiusSteps: 64, spectral: { fromNm: 380, toNm: 780, stepNm: 1 } });
    expect(costly.status).toBe(422);
    expect(costly.body.error).toBe("too-costly");
    expect(costly.body.message).toMatch(/shares the synchronous limit/);
  });
});
