// Headless Chromium (Debian `chromium`) for the page's browser tests, driven by playwright-core.
import { chromium, type Browser, type Page } from "playwright-core";
import { programRuns } from "./tools.js";

const CHROMIUM = "/usr/bin/chromium";
const CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];

/** Whether the browser is installed (tests skip with skipWithout when it is not). */
export const hasChromium = programRuns(CHROMIUM, ["--version"]);

export function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS });
}

/** The page's uncaught errors and console errors (except those `expected` matches), for a test to find empty. */
export function watchProblems(page: Page, expected?: RegExp): string[] {
  const problems: string[] = [];
  page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
  page.on("console", (m) => {
    if (m.type() === "error" && !(expected && expected.test(m.text()))) problems.push(`console: ${m.text()}`);
  });
  return problems;
}
