// The page's texture and water controls in a real browser (Debian's chromium): the KTX2 download, the time-of-day
// texture download and the calm-water switch of the camera preview send the right requests and save the right files.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import { mkdirSync, readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import type { AddressInfo } from "node:net";
import type { Browser, Page, Request } from "playwright-core";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { skipWithout } from "../helpers/tools.js";
import { hasChromium, launchChromium, watchProblems } from "../helpers/page-browser.js";
import { KTX2_IDENTIFIER, readKtx2BySpec } from "../helpers/ktx2-spec-reader.js";

const ARTIFACTS = new URL("../../test-artifacts/", import.meta.url);

let app: FastifyInstance;
let base: string;
let browser: Browser | undefined;

beforeAll(async () => {
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0 } });
  await app.listen({ port: 0, host: "127.0.0.1" });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

/** Clicks a download button; returns the request it sent and the saved file's bytes. */
async function downloadVia(page: Page, button: string, path: string): Promise<{ request: Request; bytes: Buffer; fileName: string }> {
  const [request, download] = await Promise.all([
    page.waitForRequest((r) => r.url().includes(path) && r.method() === "POST", { timeout: 120_000 }),
    page.waitForEvent("download", { timeout: 120_000 }).catch(async (error: Error) => {
      throw new Error(`${error.message}; the page says: ${await page.textContent("#status")}`);
    }),
    page.click(button),
  ]);
  const file = fileURLToPath(new URL(download.suggestedFilename(), ARTIFACTS));
  await download.saveAs(file);
  return { request, bytes: readFileSync(file), fileName: download.suggestedFilename() };
}

describe.skipIf(skipWithout(hasChromium))("texture downloads and the water switch on the page", () => {
  it("KTX2 and time-of-day downloads are KTX 2.0 files with the right layers; the water switch reaches the preview and the view export", { timeout: 300_000 }, async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true });
    const page = await context.newPage();
    const problems = watchProblems(page);
    // A one-size preset keeps every render short.
    await page.goto(`${base}/?preset=garden-sprinkler`);
    await page.waitForFunction(() => Number(document.body.dataset.renders) > 0 && document.body.dataset.state === "ready", undefined, { timeout: 60_000 });

    // The lookup texture as KTX2: one layer (layerCount 0, "not an array texture", KTX 2.0 §3.4), RGBA16F
    // (VK_FORMAT_R16G16B16A16_SFLOAT = 97, Vulkan 1.3 VkFormat), 512 texels of the scenario's drops (one row).
    const single = await downloadVia(page, "#download-lut-ktx2", "/v1/lut");
    expect(new URL(single.request.url()).searchParams.get("format")).toBe("ktx2");
    const singleBody = JSON.parse(single.request.postData() ?? "{}");
    expect(singleBody.sunElevations).toBeUndefined();
    expect(singleBody.sizes).toEqual({ kind: "none" });
    expect(single.fileName).toMatch(/^antisolar-[0-9a-f]{10}-lut\.ktx2$/);
    // The file identifier: «KTX 20»\r\n\x1A\n (KTX 2.0 specification, §3.1).
    expect([...single.bytes.subarray(0, 12)]).toEqual(KTX2_IDENTIFIER);
    const singleFile = readKtx2BySpec(new Uint8Array(single.bytes));
    expect([singleFile.vkFormat, singleFile.pixelWidth, singleFile.pixelHeight, singleFile.layerCount]).toEqual([97, 512, 1, 0]);

    // The time-of-day texture: 16 sun elevations 0–45° as 16 array layers of the same texture; the scenario's own
    // elevation is left to the slices.
    const byHour = await downloadVia(page, "#download-lut-by-hour", "/v1/lut");
    const byHourBody = JSON.parse(byHour.request.postData() ?? "{}");
    expect(byHourBody.sunElevations).toEqual({ fromDeg: 0, toDeg: 45, slices: 16 });
    expect(byHourBody.scenario.sun?.elevationDeg).toBeUndefined();
    expect(byHour.fileName).toMatch(/-lut-by-hour\.ktx2$/);
    expect([...byHour.bytes.subarray(0, 12)]).toEqual(KTX2_IDENTIFIER);
    const byHourFile = readKtx2BySpec(new Uint8Array(byHour.bytes));
    expect([byHourFile.vkFormat, byHourFile.pixelWidth, byHourFile.pixelHeight, byHourFile.layerCount]).toEqual([97, 512, 1, 16]);
    // One level holding 16 layers of 512 × 1 RGBA16F texels (8 bytes each).
    expect(byHourFile.levels[0].data.byteLength).toBe(16 * 512 * 8);
    const mapping = JSON.parse(Object.fromEntries(byHourFile.keyValues)["antisolar.mapping"]);
    expect(mapping.slices.count).toBe(16);
    expect(mapping.slices.valuesDeg).toEqual(Array.from({ length: 16 }, (_, k) => k * 3));

    // The water switch: the camera preview is redrawn with the water below the horizon…
    const skyOf = () => page.evaluate(() => (document.getElementById("sky") as HTMLCanvasElement).toDataURL());
    const dry = await skyOf();
    await page.check("#water");
    await expect.poll(skyOf).not.toBe(dry);
    const wet = await skyOf();
    // …and the camera-view export carries the calm water; an OpenEXR file comes back (magic number 20000630,
    // OpenEXR file layout).
    const withWater = await downloadVia(page, "#download-view-exr", "/v1/view");
    expect(JSON.parse(withWater.request.postData() ?? "{}").waterSurface).toEqual({ kind: "calm" });
    expect(withWater.bytes.readUInt32LE(0)).toBe(20000630);
    expect(withWater.fileName).toMatch(/-view\.exr$/);

    // Switched off: the preview is the dry one again, and the export asks for no water.
    await page.uncheck("#water");
    await expect.poll(skyOf).toBe(dry);
    expect(wet).not.toBe(dry);
    const withoutWater = await downloadVia(page, "#download-view-exr", "/v1/view");
    expect(JSON.parse(withoutWater.request.postData() ?? "{}").waterSurface).toBeUndefined();
    expect(withoutWater.bytes.readUInt32LE(0)).toBe(20000630);
    expect(withoutWater.bytes.equals(withWater.bytes)).toBe(false);

    expect(problems).toEqual([]);
    await context.close();
  });
});
