import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdirSync, readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import type { AddressInfo } from "node:net";
import { chromium, type Browser, type Page } from "playwright-core";
import sharp from "sharp";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { AUTO_AIRY_FROM_RADIUS_UM } from "../../lib/bow/engine-choice.js";
import { RADIUS_DENSITIES } from "../../lib/bow/radius-density.js";
import { channelsOf, parseHeader } from "../helpers/exr-reader.js";

// The explorer page in a real browser (Debian's chromium), served by the real app with the page's routes
// registered as http/app.ts registers them.

const ARTIFACTS = new URL("../../test-artifacts/", import.meta.url);
const AXE_SOURCE = readFileSync(fileURLToPath(new URL("../../node_modules/axe-core/axe.min.js", import.meta.url)), "utf8");
const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

let app: FastifyInstance;
let base: string;
/** Extra latency for POST /v1/profile, so the test can act while a render is on its way. */
let profileDelayMs = 0;

beforeAll(async () => {
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0 } });
  app.addHook("onRequest", async (request) => {
    if (profileDelayMs > 0 && request.url.startsWith("/v1/profile")) await new Promise((r) => setTimeout(r, profileDelayMs));
  });
  await app.listen({ port: 0, host: "127.0.0.1" });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await app?.close();
});

describe("static files of the page", () => {
  it("state the service's own auto switch radius and offer every mieSizesPerDecade the schema allows", () => {
    const page = readFileSync(fileURLToPath(new URL("../../web/index.html", import.meta.url)), "utf8");
    const script = readFileSync(fileURLToPath(new URL("../../web/request-body.js", import.meta.url)), "utf8");
    expect(page).toContain(`Auto: exact Mie where affordable (always below ${AUTO_AIRY_FROM_RADIUS_UM} µm), else Airy`);
    expect(script).toContain(`const AUTO_AIRY_FROM_RADIUS_UM = ${AUTO_AIRY_FROM_RADIUS_UM};`);
    const select = /<select id="mie-sizes" name="mieSizesPerDecade">([\s\S]*?)<\/select>/.exec(page)![1];
    const offered = [...select.matchAll(/value="([^"]+)"/g)].map((m) => (m[1] === "auto" ? "auto" : Number(m[1])));
    expect(offered).toEqual(["auto", ...RADIUS_DENSITIES]);
  });

  it("serves the page with a same-origin-only Content-Security-Policy and the right content types", async () => {
    const page = await app.inject({ method: "GET", url: "/" });
    expect(page.statusCode).toBe(200);
    expect(page.headers["content-type"]).toBe("text/html; charset=utf-8");
    const csp = String(page.headers["content-security-policy"]);
    // Every fetch directive is 'self' or 'none': no inline code, no other origin (CSP Level 3, W3C).
    for (const directive of csp.split(";").map((d) => d.trim())) {
      expect(directive, directive).toMatch(/^[a-z-]+ '(self|none)'$/);
    }
    expect(csp).toContain("default-src 'self'");
    expect(page.headers["x-content-type-options"]).toBe("nosniff");
    expect(page.headers["x-frame-options"]).toBe("DENY");
    expect(page.body).toContain('<script type="module" src="/web/app.js">');

    const types: Record<string, RegExp> = {
      "/web/app.js": /^text\/javascript/,
      "/web/styles.css": /^text\/css/,
      "/web/icon.svg": /^image\/svg\+xml/,
      "/web/locus-cie1931-2.json": /^application\/json/,
    };
    for (const [url, type] of Object.entries(types)) {
      const res = await app.inject({ method: "GET", url });
      expect(res.statusCode, url).toBe(200);
      expect(res.headers["content-type"], url).toMatch(type);
      expect(res.headers["content-security-policy"], url).toBe(csp);
    }
  });

  it("refuses every name outside the whitelist, including path traversal", async () => {
    const attempts = [
      "/web/../package.json",
      "/web/..%2Fpackage.json",
      "/web/%2e%2e%2fpackage.json",
      "/web/..%5Cpackage.json",
      "/web/app.js%00.html",
      "/web/index.HTML",
      "/web/__proto__",
      "/web/constructor",
      "/web/",
      "/web/server%2Fapp.ts",
    ];
    for (const url of attempts) {
      const res = await app.inject({ method: "GET", url });
      expect(res.statusCode, url).toBe(404);
      expect(res.body, url).not.toContain('"dependencies"');
      expect(res.json().error, url).toBe("not-found");
    }
  });

  // CIE 2019 chromaticity coordinates of the spectrum locus, 5 decimals: "CIE 1931 chromaticity coordinates"
  // (CIE_cc_1931_2deg, DOI 10.25039/CIE.DS.mifmy4x4) and the 10° set computed the same way from CIE_xyz_1964_10deg.
  const published: Record<string, [number, number, number][]> = {
    "cie1931-2": [
      [400, 0.17334, 0.0048],
      [450, 0.15664, 0.0177],
      [500, 0.00817, 0.53842],
      [520, 0.0743, 0.8338],
      [550, 0.3016, 0.69231],
      [580, 0.51249, 0.48659],
      [600, 0.62704, 0.37249],
      [620, 0.6915, 0.30834],
      [700, 0.73469, 0.26531],
    ],
    "cie1964-10": [
      [400, 0.17839, 0.01871],
      [450, 0.151, 0.03644],
      [500, 0.00559, 0.67454],
      [520, 0.12524, 0.81019],
      [550, 0.3473, 0.65009],
      [580, 0.53856, 0.46144],
      [600, 0.63063, 0.36937],
      [620, 0.68266, 0.31734],
      [700, 0.72036, 0.27964],
    ],
  };
  for (const observer of Object.keys(published)) {
    it(`serves the ${observer} spectrum locus matching the CIE's published chromaticities`, async () => {
      const res = await app.inject({ method: "GET", url: `/web/locus-${observer}.json` });
      const locus = res.json() as { points: { wavelengthNm: number; x: number; y: number }[]; source: string };
      expect(locus.source).toMatch(/CC BY-SA 4\.0/);
      expect(locus.points.every((p) => Number.isFinite(p.x) && Number.isFinite(p.y))).toBe(true);
      for (const [nm, x, y] of published[observer]) {
        const p = locus.points.find((q) => q.wavelengthNm === nm)!;
        // Both sides are rounded to 5 decimals: one unit in the last place.
        expect(Math.abs(p.x - x), `${nm} nm x`).toBeLessThanOrEqual(1e-5 + 1e-12);
        expect(Math.abs(p.y - y), `${nm} nm y`).toBeLessThanOrEqual(1e-5 + 1e-12);
      }
    });
  }
});

describe("the explorer page in chromium", () => {
  let browser: Browser;

  beforeAll(async () => {
    browser = await chromium.launch({ executablePath: "/usr/bin/chromium", args: CHROMIUM_ARGS });
  });
  afterAll(async () => {
    await browser?.close();
  });

  async function renders(page: Page): Promise<number> {
    return Number(await page.getAttribute("body", "data-renders"));
  }
  async function waitForRender(page: Page, after: number) {
    await page.waitForFunction((n) => Number(document.body.dataset.renders) > n && document.body.dataset.state === "ready", after, {
      timeout: 30_000,
    });
  }
  async function primaryDeg(page: Page): Promise<number> {
    const label = await page.locator(".bow-label", { hasText: "primary" }).textContent();
    return Number(/primary ([\d.]+)°/.exec(label ?? "")![1]);
  }

  it("renders, follows a change of drop size, exports decodable PNGs, and passes axe-core", { timeout: 120_000 }, async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    const context = await browser.newContext({
      viewport: { width: 1440, height: 1000 },
      acceptDownloads: true,
      permissions: ["clipboard-read", "clipboard-write"],
    });
    const page = await context.newPage();
    const problems: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error") problems.push(`console: ${m.text()}`);
    });
    page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
    await page.addInitScript(() => {
      document.addEventListener("securitypolicyviolation", (e) => console.error(`CSP violation: ${e.violatedDirective} ${e.blockedURI}`));
    });
    const previewSteps: number[] = [];
    const aborted: string[] = [];
    page.on("request", (r) => {
      if (r.url().endsWith("/v1/profile") && r.method() === "POST") previewSteps.push(JSON.parse(r.postData() ?? "{}").spectral.stepNm);
    });
    page.on("requestfailed", (r) => {
      if (r.url().includes("/v1/profile")) aborted.push(r.failure()?.errorText ?? "");
    });

    // A one-size preset keeps each preview well under a second.
    await page.goto(`${base}/?preset=garden-sprinkler`);
    await waitForRender(page, 0);
    expect(await page.inputValue("#radius")).toBe("400");

    // Keyboard: the first Tab lands on the skip link, drawn with a visible focus outline.
    await page.keyboard.press("Tab");
    const focused = await page.evaluate(() => {
      const el = document.activeElement as HTMLElement;
      return { cls: el.className, outline: getComputedStyle(el).outlineStyle, top: el.getBoundingClientRect().top };
    });
    expect(focused.cls).toBe("skip");
    expect(focused.outline).toBe("solid");
    expect(focused.top).toBeGreaterThanOrEqual(0);

    // …and the next ones walk the controls in reading order, starting with the preset.
    await page.keyboard.press("Tab");
    expect(await page.evaluate(() => document.activeElement?.id)).toBe("preset");

    const strip0 = await page.evaluate(() => (document.getElementById("strip") as HTMLCanvasElement).toDataURL());
    const plot0 = await page.getAttribute(".line-luminance", "d");
    const primary0 = await primaryDeg(page);
    expect(await page.locator("#chromaticity svg .sample").count()).toBeGreaterThan(100);

    // Smaller drops: strip and plot change, and the primary's main maximum moves further inside the geometric
    // rainbow angle (Airy 1838; van de Hulst 1957 §13.2: the shift grows as (λ/r)^(2/3)).
    let done = await renders(page);
    await page.fill("#radius", "150");
    await waitForRender(page, done);
    const strip1 = await page.evaluate(() => (document.getElementById("strip") as HTMLCanvasElement).toDataURL());
    expect(strip1).not.toBe(strip0);
    expect(await page.getAttribute(".line-luminance", "d")).not.toBe(plot0);
    expect(await primaryDeg(page)).toBeLessThan(primary0);

    expect(previewSteps.every((s) => s === 20)).toBe(true);

    // Exports at full resolution (10 nm): PNG strips decode with the right size and depth.
    for (const [button, depth] of [
      ["#download-png", "uchar"],
      ["#download-png16", "ushort"],
    ] as const) {
      const [download] = await Promise.all([page.waitForEvent("download", { timeout: 30_000 }), page.click(button)]);
      const path = fileURLToPath(new URL(download.suggestedFilename(), ARTIFACTS));
      await download.saveAs(path);
      const meta = await sharp(path).metadata();
      expect(meta.format).toBe("png");
      expect(meta.depth).toBe(depth);
      // garden-sprinkler: ψ 36–56° every 0.05° is 401 columns; the strip height field defaults to 64.
      expect([meta.width, meta.height]).toEqual([401, 64]);
      const { data, info } = await sharp(path).raw({ depth }).toBuffer({ resolveWithObject: true });
      const bytes = depth === "ushort" ? 2 : 1;
      expect(data.length).toBe(info.width * info.height * info.channels * bytes);
      const sample = (x: number, y: number, c: number) => {
        const at = ((y * info.width + x) * info.channels + c) * bytes;
        return bytes === 2 ? data.readUInt16LE(at) : data[at];
      };
      // One colour per column (the strip is constant down each column) and the bow makes the columns differ.
      const columns = new Set<string>();
      for (let x = 0; x < info.width; x++) {
        const top = [0, 1, 2].map((c) => sample(x, 0, c));
        expect([0, 1, 2].map((c) => sample(x, info.height - 1, c))).toEqual(top);
        columns.add(top.join(","));
      }
      expect(columns.size).toBeGreaterThan(100);
      // A real 16-bit strip has levels an 8-bit one scaled by 257 cannot have (PNG Third Edition §12.4 sample depth scaling).
      if (bytes === 2) expect([...columns].some((c) => c.split(",").some((v) => Number(v) % 257 !== 0))).toBe(true);
    }
    const [jsonDownload] = await Promise.all([page.waitForEvent("download"), page.click("#download-json")]);
    const jsonPath = fileURLToPath(new URL(jsonDownload.suggestedFilename(), ARTIFACTS));
    await jsonDownload.saveAs(jsonPath);
    const exported = JSON.parse(readFileSync(jsonPath, "utf8"));
    expect(exported.meta.wavelengths.stepNm).toBe(10);
    expect(exported.anglesDeg).toHaveLength(401);

    // The lookup texture downloads as an OpenEXR file (magic number 20000630, OpenEXR file layout).
    const [lutDownload] = await Promise.all([page.waitForEvent("download"), page.click("#download-lut-exr")]);
    const lutPath = fileURLToPath(new URL(lutDownload.suggestedFilename(), ARTIFACTS));
    await lutDownload.saveAs(lutPath);
    expect(readFileSync(lutPath).readUInt32LE(0)).toBe(20000630);
    // With the layer choice by scattering order the same download holds the layers beside R, G, B, A (OpenEXR
    // channel list, read back by test/helpers/exr-reader.ts).
    await page.selectOption("#exr-layers", "by-order");
    const [layeredDownload] = await Promise.all([page.waitForEvent("download"), page.click("#download-lut-exr")]);
    expect(layeredDownload.suggestedFilename()).toMatch(/-lut-by-order\.exr$/);
    const layeredPath = fileURLToPath(new URL(layeredDownload.suggestedFilename(), ARTIFACTS));
    await layeredDownload.saveAs(layeredPath);
    const header = parseHeader(readFileSync(layeredPath));
    expect(channelsOf(header.attributes.get("channels")!).map((c) => c.name)).toEqual(
      ["A", "B", "G", "R", ...["higher", "primary", "reflection", "secondary", "transmission"].flatMap((n) => [`${n}.B`, `${n}.G`, `${n}.R`])],
    );
    await page.selectOption("#exr-layers", "combined");

    // The curl command carries the same request: the service accepts it as it stands.
    const curl = await page.inputValue("#curl");
    const body = JSON.parse(/-d '([^']*)'/.exec(curl)![1]);
    expect(body.drops).toEqual({ kind: "monodisperse", radiusUm: 150, numberPerM3: 3000 });
    const replay = await app.inject({ method: "POST", url: "/v1/profile", payload: body });
    expect(replay.statusCode).toBe(200);
    expect(replay.json().meta.hash).toBe(exported.meta.hash);
    await page.click("#copy-curl");
    await expect.poll(() => page.textContent("#status")).toBe("The curl command is on the clipboard.");
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(curl);

    // axe-core (WCAG 2.x A/AA and best-practice rules): no violations of any impact.
    await page.evaluate(AXE_SOURCE);
    type AxeResult = { id: string; impact: string | null; nodes: unknown[] };
    const audit = await page.evaluate(async () => {
      const axe = (window as unknown as { axe: { run: (ctx: Document) => Promise<{ violations: AxeResult[]; passes: AxeResult[] }> } }).axe;
      const result = await axe.run(document);
      return { violations: result.violations.map((v) => `${v.impact} ${v.id} (${v.nodes.length})`), passes: result.passes.map((p) => p.id) };
    });
    expect(audit.violations).toEqual([]);
    // The audit really looked at the page: labels, contrast and names were checked and passed.
    expect(audit.passes).toEqual(expect.arrayContaining(["label", "color-contrast", "button-name", "svg-img-alt", "region"]));

    await page.mouse.click(5, 5);
    await page.screenshot({ path: fileURLToPath(new URL("web-explorer.png", ARTIFACTS)), fullPage: true });

    // A change while a preview is on its way aborts it, and Stop aborts the one that replaced it.
    // Long enough that the first preview is surely still on its way when the second replaces it, even on a loaded machine.
    profileDelayMs = 8000;
    // Before anything is sent, the page warns that Lorenz–Mie is costly for drops this large.
    await page.selectOption("#method", "mie");
    expect(await page.textContent("#estimate")).toMatch(/Lorenz–Mie for drops of about 150 µm needs about [\d,]+ series terms/);
    const firstSent = page.waitForRequest((r) => r.url().endsWith("/v1/profile") && JSON.parse(r.postData() ?? "{}").drops.kind === "lognormal");
    await page.selectOption("#drops-kind", "lognormal");
    await firstSent;
    const secondSent = page.waitForRequest((r) => r.url().endsWith("/v1/profile") && JSON.parse(r.postData() ?? "{}").drops.medianRadiusUm === 12);
    await page.fill("#median-radius", "12");
    await secondSent;
    expect(await page.getAttribute("body", "data-state")).toBe("busy");
    expect(await page.textContent("#elapsed")).toMatch(/^Rendering the preview: \d+\.\d s$/);
    await page.click("#cancel");
    await page.waitForFunction(() => document.body.dataset.state !== "busy");
    expect(await page.textContent("#status")).toMatch(/^Stopped/);
    // The browser reports each aborted request asynchronously; wait for both reports.
    await expect.poll(() => aborted.length, { timeout: 5000 }).toBeGreaterThanOrEqual(2);
    expect(new Set(aborted)).toEqual(new Set(["net::ERR_ABORTED"]));
    profileDelayMs = 0;

    expect(problems).toEqual([]);
    await context.close();
  });

  it("place and time, the moon as the light and the eye's view: the requests carry them, the answers are shown", { timeout: 120_000 }, async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
    const page = await context.newPage();
    const problems: string[] = [];
    page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
    const bodies: { sun?: { at?: { utc: string } }; moon?: { at?: { utc: string } }; output: { vision: string } }[] = [];
    page.on("request", (r) => {
      if (r.url().endsWith("/v1/profile") && r.method() === "POST") bodies.push(JSON.parse(r.postData() ?? "{}"));
    });
    await page.goto(`${base}/?preset=garden-sprinkler`);
    await waitForRender(page, 0);
    // The place-and-time fields and the moon's phase appear only when chosen.
    expect(await page.isVisible("#moment")).toBe(false);
    expect(await page.isVisible("#phase")).toBe(false);

    // The page's own example, an invented town at 47.2° N 8.4° E on 2026-06-21 at 18:30 UTC: the sun is up.
    let n = await renders(page);
    await page.selectOption("#position-by", "place-and-time");
    await waitForRender(page, n);
    expect(bodies.at(-1)!.sun!.at!.utc).toBe("2026-06-21T18:30:00Z");
    expect(await page.getAttribute("#sky", "aria-label")).toMatch(/the sun is [\d.]+° high/);
    const evening = Number(/the sun is ([\d.]+)° high/.exec((await page.getAttribute("#sky", "aria-label")) ?? "")![1]);

    // The scrubber moves the moment as a sequence's frames would: an hour earlier the sun stands higher.
    n = await renders(page);
    await page.fill("#scrub", "-60");
    await waitForRender(page, n);
    expect(bodies.at(-1)!.sun!.at!.utc).toBe("2026-06-21T17:30:00Z");
    expect(await page.textContent("#scrub-value")).toBe("−1 h 00 min");
    const earlier = Number(/the sun is ([\d.]+)° high/.exec((await page.getAttribute("#sky", "aria-label")) ?? "")![1]);
    expect(earlier).toBeGreaterThan(evening);
    await page.fill("#scrub", "0");

    // The moon, at an hour it stands high (2026-03-03 00:00 UTC, an invented place at 46.5° N 7.9° E), seen by eye.
    n = await renders(page);
    await page.selectOption("#light", "moon");
    await page.fill("#moment", "2026-03-03T00:00");
    await page.fill("#latitude", "46.5");
    await page.fill("#longitude", "7.9");
    await page.selectOption("#vision", "eye");
    await waitForRender(page, n);
    const last = bodies.at(-1)!;
    expect(last.moon!.at!.utc).toBe("2026-03-03T00:00:00Z");
    expect(last.sun).toBeUndefined();
    expect(last.output.vision).toBe("eye");
    expect(await page.getAttribute("#sky", "aria-label")).toMatch(/the moon is 51\.\d+° high/);

    // A moment with the moon down: the service's 422 is shown, naming the field.
    await page.fill("#moment", "2026-03-03T11:00");
    await page.waitForFunction(() => /below the horizon/.test(document.getElementById("status")?.textContent ?? ""), null, { timeout: 30_000 });
    expect(await page.textContent("#status")).toMatch(/moon\.at\.utc/);
    expect(problems).toEqual([]);
    await context.close();
  });
});
