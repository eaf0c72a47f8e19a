// The deployment README names every kind of job the pipeline can run, so an operator can find each one.
import { describe, it, expect } from "vitest";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { builtInRenderers } from "../../../pipeline/jobs/renderers.js";

describe("deploy/README.md", () => {
  it("lists every job kind of pipeline/jobs/renderers.ts", () => {
    const readme = readFileSync(fileURLToPath(new URL("../../../deploy/README.md", import.meta.url)), "utf8");
    const kinds = Object.keys(builtInRenderers);
    expect(kinds.length).toBeGreaterThan(0);
    for (const kind of kinds) expect(readme, kind).toContain(`\`${kind}\``);
  });
});
