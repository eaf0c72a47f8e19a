// The explorer page with flattened drops: the shape control and the place along the bow reach the requests, and the
// camera preview blends profiles taken along the arc, so the top of a shower of large drops dims against its side
// (Fraser 1983, J. Opt. Soc. Am. 73, 1626: the top of the primary is weak in rain of large drops).
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import type { AddressInfo } from "node:net";
import type { Browser, Page } from "playwright-core";
import sharp from "sharp";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { skipWithout } from "../helpers/tools.js";
import { hasChromium, launchChromium, watchProblems } from "../helpers/page-browser.js";

/** The camera preview's profiles along the arc are held back this long, so the test sees the view before them. */
const ARC_DELAY_MS = 3000;

let app: FastifyInstance;
let base: string;
let browser: Browser | undefined;

beforeAll(async () => {
  // A high synchronous limit: the flattened previews answer directly (the job route is page-job.test.ts's).
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, maxEventLoopDelayMs: 0, maxProfileTermAngles: 1e15 } });
  app.addHook("preHandler", async (request) => {
    const body = request.body as { arcPositionDeg?: number } | undefined;
    if (request.url.startsWith("/v1/profile") && body?.arcPositionDeg !== undefined && body.arcPositionDeg !== 0) {
      await new Promise((r) => setTimeout(r, ARC_DELAY_MS));
    }
  });
  await app.listen({ port: 0, host: "127.0.0.1" });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

/** Sum of R + G + B down the centre column of the camera preview, over its upper half (above the antisolar point). */
async function topOfBowBrightness(page: Page): Promise<number> {
  const url = await page.evaluate(() => (document.getElementById("sky") as HTMLCanvasElement).toDataURL("image/png"));
  const { data, info } = await sharp(Buffer.from(url.split(",")[1], "base64")).raw().toBuffer({ resolveWithObject: true });
  const x = Math.floor(info.width / 2);
  let sum = 0;
  for (let y = 0; y < info.height / 2; y++) for (let c = 0; c < 3; c++) sum += data[(y * info.width + x) * info.channels + c];
  return sum;
}

describe.skipIf(skipWithout(hasChromium))("flattened drops on the page", () => {
  it("shape control, canting and arc slider reach the requests; the camera view blends the bow along the arc", { timeout: 600_000 }, async () => {
    browser = await launchChromium();
    const page = await browser.newPage();
    const problems = watchProblems(page);
    const bodies: { drops: { shape?: unknown }; arcPositionDeg?: number }[] = [];
    page.on("request", (r) => {
      if (r.url().endsWith("/v1/profile") && r.method() === "POST") bodies.push(JSON.parse(r.postData() ?? "{}"));
    });
    await page.goto(`${base}/?preset=garden-sprinkler`);
    await page.waitForFunction(() => Number(document.body.dataset.renders) > 0 && document.body.dataset.state === "ready", undefined, { timeout: 60_000 });
    expect(await page.isHidden("#arc-position")).toBe(true);

    // 2 mm drops without canting (the cheapest flattened case), taken at the top of the bow.
    await page.selectOption("#drops-kind", "monodisperse");
    await page.fill("#radius", "1000");
    await page.selectOption("#drop-shape", "equilibrium");
    expect(await page.isVisible("#arc-position")).toBe(true);
    await page.fill("#canting", "0");
    const topAnswer = page.waitForResponse(
      (r) => r.url().endsWith("/v1/profile") && JSON.parse(r.request().postData() ?? "{}").arcPositionDeg === 0 && JSON.parse(r.request().postData() ?? "{}").drops.radiusUm === 1000,
      { timeout: 300_000 },
    );
    const renders = Number(await page.evaluate(() => document.body.dataset.renders));
    await page.$eval("#arc-position", (el) => {
      (el as HTMLInputElement).value = "0";
      el.dispatchEvent(new Event("input", { bubbles: true }));
    });
    expect(await page.textContent("#arc-position-value")).toBe("0°");
    await topAnswer;
    // The profile at the top is drawn; the other places along the arc are still held back by the server.
    await page.waitForFunction(() => document.getElementById("results")?.dataset.stale === "false", undefined, { timeout: 60_000 });
    await page.waitForTimeout(300);
    const before = await topOfBowBrightness(page);
    expect(await page.getAttribute("#sky", "data-along-arc")).toBe("");

    await page.waitForFunction((n) => Number(document.body.dataset.renders) > n && document.body.dataset.state === "ready", renders, { timeout: 500_000 });
    expect(await page.getAttribute("#sky", "data-along-arc")).toBe("0,45,90");
    expect(await page.getAttribute("#sky", "aria-label")).toMatch(/blended from profiles at 0°, 45°, 90° along the arc/);
    const sent = bodies.filter((b) => b.drops.shape !== undefined);
    expect(sent.at(-3)).toMatchObject({ drops: { radiusUm: 1000, shape: { kind: "equilibrium", cantingSdDeg: 0 } }, arcPositionDeg: 0 });
    expect(sent.slice(-2).map((b) => b.arcPositionDeg)).toEqual([45, 90]);
    // Drawn alone, the top's profile fills the view at its own peak; beside the side's brighter bow the top dims.
    const after = await topOfBowBrightness(page);
    expect(after).toBeLessThan(before);
    expect(problems).toEqual([]);
  });
});
