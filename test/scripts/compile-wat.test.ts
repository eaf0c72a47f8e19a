import { describe, it, expect } from "vitest";
import { execFileSync } from "node:child_process";
import { fileURLToPath } from "node:url";

// The WebAssembly kernels' text sources (lib/mie/wasm/*.wat) are the artefact; the committed binaries in
// lib/mie/wasm/modules.generated.ts must be exactly what `wabt` compiles them to, so neither can drift.
describe("scripts/compile-wat.mjs", () => {
  it("lib/mie/wasm/modules.generated.ts is what the .wat sources compile to", () => {
    const script = fileURLToPath(new URL("../../scripts/compile-wat.mjs", import.meta.url));
    expect(() => execFileSync(process.execPath, [script, "--check"], { stdio: "pipe" })).not.toThrow();
  });
});
