// The pipeline (requests in, results out) knows nothing of HTTP: no file under pipeline/ imports fastify or a
// fastify plugin, so the CLI and the job workers use it without a server. lib/ and schemas/ likewise.
import { describe, it, expect } from "vitest";
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL("../../", import.meta.url));

function sourceFiles(folder: string): string[] {
  return readdirSync(join(root, folder), { withFileTypes: true, recursive: true })
    .filter((entry) => entry.isFile() && entry.name.endsWith(".ts"))
    .map((entry) => join(entry.parentPath, entry.name));
}

const importsFastify = /(?:from\s+|import\s*\(\s*|require\s*\(\s*)["'](?:fastify|fastify-plugin|@fastify\/[^"']+)["']/;

describe("layers", () => {
  for (const folder of ["pipeline", "lib", "schemas"]) {
    it(`nothing under ${folder}/ imports fastify`, () => {
      const files = sourceFiles(folder);
      expect(files.length).toBeGreaterThan(0);
      expect(files.filter((file) => importsFastify.test(readFileSync(file, "utf8")))).toEqual([]);
    });
  }

  it("the check itself sees an import of fastify", () => {
    expect(importsFastify.test('import type { FastifyReply } from "fastify";')).toBe(true);
    expect(importsFastify.test('import cors from "@fastify/cors";')).toBe(true);
    expect(importsFastify.test('const m = await import("fastify");')).toBe(true);
  });
});
