// The page's sequence preview: the camera view over a span of time is submitted as one background job (POST
// /v1/jobs with "sequence"), the job's progress counts frames on the page, and the returned frames are shown on a
// scrubber, each with its moment and the sun's elevation from the archive's manifest.
import { describe, it, expect, beforeAll, afterAll } from "vitest";
import type { AddressInfo } from "node:net";
import type { Browser } from "playwright-core";
import type { FastifyInstance } from "fastify";
import { buildApp } from "../../http/app.js";
import { skipWithout } from "../helpers/tools.js";
import { hasChromium, launchChromium, watchProblems } from "../helpers/page-browser.js";


let app: FastifyInstance;
let base: string;
let browser: Browser | undefined;

beforeAll(async () => {
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, maxEventLoopDelayMs: 0 } });
  await app.listen({ port: 0, host: "127.0.0.1" });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

interface SequenceJob {
  endpoint: string;
  body: { sun: { at: { utc: string; latitudeDeg: number } }; camera: { widthPx: number; heightPx: number } };
  query: { format: string };
  sequence: { fromUtc: string; toUtc: string; frames: number };
}

describe.skipIf(skipWithout(hasChromium))("the sequence preview on the page", () => {
  it("submits the span as one job, shows its progress in frames, then scrubs through the returned frames", { timeout: 300_000 }, async () => {
    browser = await launchChromium();
    const page = await browser.newPage();
    const problems = watchProblems(page);
    await page.goto(`${base}/?preset=garden-sprinkler`);
    const ready = () => page.waitForFunction(() => Number(document.body.dataset.renders) > 0 && document.body.dataset.state === "ready", undefined, { timeout: 120_000 });
    await ready();
    // By elevation there is no span of time to render.
    expect(await page.isDisabled("#sequence-render")).toBe(true);
    // The page's invented town at 47.2° N 8.4° E, a June afternoon: the sun sinks from about 45° through the span.
    await page.selectOption("#position-by", "place-and-time");
    await page.fill("#moment", "2026-06-21T15:00");
    await ready();
    expect(await page.isHidden("#sequence-viewer")).toBe(true);
    await page.fill("#sequence-hours", "1.5");
    await page.fill("#sequence-frames", "4");

    // Every text the progress line shows while the job runs.
    await page.evaluate(() => {
      const seen: string[] = [];
      (window as unknown as { progressTexts: string[] }).progressTexts = seen;
      const text = document.getElementById("job-progress-text")!;
      new MutationObserver(() => seen.push(text.textContent ?? "")).observe(text, { childList: true, characterData: true, subtree: true });
    });
    const submitted = page.waitForRequest((r) => r.url().endsWith("/v1/jobs") && r.method() === "POST");
    await page.click("#sequence-render");
    const job = JSON.parse((await submitted).postData() ?? "{}") as SequenceJob;
    expect(job.endpoint).toBe("view");
    expect(job.query).toEqual({ format: "png" });
    expect(job.sequence).toEqual({ fromUtc: "2026-06-21T15:00:00.000Z", toUtc: "2026-06-21T16:30:00.000Z", frames: 4 });
    expect(job.body.sun.at).toMatchObject({ utc: "2026-06-21T15:00:00.000Z", latitudeDeg: 47.2 });
    expect(job.body.camera).toMatchObject({ widthPx: 320, heightPx: 180 });

    await page.waitForFunction(() => document.getElementById("sequence-viewer")?.dataset.frames === "4" || /failed/.test(document.getElementById("status")?.textContent ?? ""), undefined, { timeout: 240_000 });
    expect(await page.textContent("#status"), problems.join("\n")).toMatch(/^Sequence ready: 4 frames/);
    expect(await page.isVisible("#sequence-viewer")).toBe(true);
    const texts = await page.evaluate(() => (window as unknown as { progressTexts: string[] }).progressTexts);
    // The progress line counted frames while the job ran.
    expect(texts.some((t) => /^\d+ % frame [1-4] of 4/.test(t)), texts.join(" | ")).toBe(true);
    expect(await page.textContent("#status")).toMatch(/^Sequence ready: 4 frames/);

    // The first frame is the moment asked for, drawn from the service's 320 × 180 PNG: the rain layer shows (alpha > 0).
    const first = (await page.textContent("#sequence-scrub-value"))!;
    expect(first).toMatch(/^frame 1 of 4: 2026-06-21 15:00 UTC, sun [\d.]+° high$/);
    const pixels = () =>
      page.evaluate(() => {
        const canvas = document.getElementById("sequence-frame") as HTMLCanvasElement;
        return Array.from(canvas.getContext("2d")!.getImageData(0, 0, canvas.width, canvas.height).data);
      });
    const firstPixels = await pixels();
    expect(firstPixels.filter((v, k) => k % 4 === 3 && v > 0).length).toBeGreaterThan(0);
    expect(await page.getAttribute("#sequence-frame", "aria-label")).toMatch(/^Camera view at 2026-06-21T15:00:00.000Z, sun/);

    // Scrubbed to the last frame: its moment, a lower sun, another image.
    await page.fill("#sequence-scrub", "3");
    const last = (await page.textContent("#sequence-scrub-value"))!;
    expect(last).toMatch(/^frame 4 of 4: 2026-06-21 16:30 UTC, sun [\d.]+° high$/);
    const elevation = (s: string) => Number(/sun ([\d.]+)° high/.exec(s)![1]);
    expect(elevation(last)).toBeLessThan(elevation(first));
    expect(await page.getAttribute("#sequence-frame", "data-frame")).toBe("3");
    expect(await pixels()).not.toEqual(firstPixels);
    expect(problems).toEqual([]);
  });
});
