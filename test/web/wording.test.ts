// The page names the automatic engine choice with one word, the API's own value "auto" shown as "Auto".
import { describe, it, expect } from "vitest";
import { readdirSync, readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

const webDir = fileURLToPath(new URL("../../web/", import.meta.url));
const pageText = readdirSync(webDir)
  .filter((name) => /\.(html|js)$/.test(name))
  .map((name) => readFileSync(webDir + name, "utf8"))
  .join("\n");

describe("the page's words", () => {
  it("calls the automatic choice \"Auto\" everywhere, never \"Automatic\"", () => {
    expect(pageText).toContain("Auto:");
    expect(pageText).not.toMatch(/\bAutomatic\b/);
  });
});
