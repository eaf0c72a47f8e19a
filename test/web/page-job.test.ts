// The explorer page with a render beyond the synchronous limit: it goes through a background job, the page shows
// the job's progress bar advancing, and Stop cancels the job on the service.
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
  // A low synchronous limit: a Lorenz–Mie shower is refused as too costly and must go through a job.
  app = await buildApp({ config: { cacheDir: "", rateLimitPerMinute: 0, maxEventLoopDelayMs: 0, maxProfileTermAngles: 1e8 } });
  await app.listen({ port: 0, host: "127.0.0.1" });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await browser?.close();
  await app?.close();
});

describe.skipIf(skipWithout(hasChromium))("a long render on the page", () => {
  it("runs as a job with a live progress bar, and Stop cancels the job", { timeout: 180_000 }, async () => {
    browser = await launchChromium();
    const page = await browser.newPage();
    // The browser logs the synchronous refusal (422 too costly) that sends the render to a job: expected.
    const problems = watchProblems(page, /status of 422/);
    // A one-size preset (Airy under auto): a quick synchronous preview first.
    await page.goto(`${base}/?preset=garden-sprinkler`);
    await page.waitForFunction(() => Number(document.body.dataset.renders) > 0 && document.body.dataset.state === "ready", undefined, { timeout: 60_000 });
    expect(await page.isHidden("#job-progress")).toBe(true);

    // A Marshall–Palmer shower of 25 mm/h with Lorenz–Mie for every drop: far beyond the limit.
    await page.selectOption("#method", "mie");
    await page.selectOption("#drops-kind", "marshall-palmer");
    const submitted = page.waitForResponse((r) => r.url().endsWith("/v1/jobs") && r.request().method() === "POST" && JSON.parse(r.request().postData() ?? "{}").body.drops.rainRateMmPerH === 25, { timeout: 60_000 });
    await page.fill("#rain-rate", "25");
    const job = (await (await submitted).json()) as { id: string };
    await page.waitForFunction((id) => document.getElementById("job-progress")?.dataset.job === id && !document.getElementById("job-progress")!.hidden, job.id, { timeout: 30_000 });

    // The bar advances: several distinct values above zero, read as the job runs.
    const seen = new Set<number>();
    for (let k = 0; k < 1200 && seen.size < 3; k++) {
      const value = await page.evaluate(() => (document.getElementById("job-progress") as HTMLProgressElement).value);
      if (value > 0) seen.add(value);
      await page.waitForTimeout(100);
    }
    expect(seen.size).toBeGreaterThanOrEqual(3);
    expect(Math.max(...seen)).toBeLessThan(1);
    expect(await page.textContent("#job-progress-text")).toMatch(/^\d+ % (kernels|spectral|colour)/);

    await page.click("#cancel");
    await page.waitForFunction(() => document.body.dataset.state !== "busy", undefined, { timeout: 30_000 });
    expect(await page.textContent("#status")).toMatch(/^Stopped/);
    expect(await page.isHidden("#job-progress")).toBe(true);
    await expect
      .poll(async () => (await app.inject({ method: "GET", url: `/v1/jobs/${job.id}` })).json().state, { timeout: 10_000 })
      .toBe("cancelled");
    expect(problems).toEqual([]);
  });
});
