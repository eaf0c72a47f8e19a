// Golden outputs: renders a fixed set of requests through the pipeline (the job renderers, which are the routes'
// renders, plus /v1/scatter and /v1/water) and prints the SHA-256 of each answer, so that a refactor can show it
// left every output bit-identical, or say which ones it changed. Volatile fields (timings, cache statistics) are
// removed from JSON before hashing. Run: `npm run build && node dist/bench/golden-outputs.js > before.txt`.
// --mie-sampling=lattice: Lorenz–Mie rows at every lattice point, as before the sub-lattice (lib/bow/mie-sub-lattice.ts).

import { createHash } from "node:crypto";
import { builtInRenderers } from "../pipeline/jobs/renderers.js";
import { KernelService } from "../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../pipeline/kernels/worker-pool.js";
import { loadPresets } from "../pipeline/requests/presets.js";
import { computeScatter } from "../pipeline/compute/scatter.js";
import { scatterRequestSchema } from "../schemas/scatter.js";
import { waterQuerySchema } from "../schemas/water.js";
import { waterIndex } from "../lib/water/water-index.js";
import type { MieSampling } from "../lib/bow/mie-sub-lattice.js";

/** Keys whose values change from run to run (timings, which cache tier answered). */
const VOLATILE_KEYS = new Set(["computeMs", "ms", "cache", "kernel"]);
const VOLATILE_HEADERS = new Set(["x-antisolar-compute-ms"]);

interface Case {
  name: string;
  endpoint: string;
  body: unknown;
  query?: Record<string, unknown>;
}

/** Small grids: the point is coverage of every path, not resolution. */
const COARSE = { spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
const RAIN = { drops: { kind: "marshall-palmer", rainRateMmPerH: 5 }, angles: { fromDeg: 38, toDeg: 54, stepDeg: 0.2 }, ...COARSE };
const SCENARIO = { drops: { kind: "lognormal", medianRadiusUm: 300, geometricSd: 1.3, totalNumberPerM3: 5000 }, ...COARSE };

function cases(): Case[] {
  const out: Case[] = [];
  for (const preset of loadPresets().values()) {
    const spectral = { ...preset.body.spectral, stepNm: 20 };
    out.push({ name: `profile preset ${preset.name}`, endpoint: "profile", body: { ...preset.body, spectral } });
  }
  for (const method of ["auto", "mie", "airy", "geometric"]) out.push({ name: `profile rain ${method}`, endpoint: "profile", body: { ...RAIN, method } });
  out.push({ name: "profile rain png strip", endpoint: "profile", body: RAIN, query: { format: "png" } });
  out.push({ name: "profile rain svg", endpoint: "profile", body: { ...RAIN, output: { space: "display-p3", normalise: "physical", white: "absolute", gamut: "clip" } }, query: { format: "svg" } });
  out.push({ name: "profile fog polariser", endpoint: "profile", body: { drops: { kind: "monodisperse", radiusUm: 20, numberPerM3: 1e8 }, polariserDeg: 30, angles: { fromDeg: 30, toDeg: 45, stepDeg: 0.25 }, ...COARSE } });
  const lutAngles = { fromDeg: 36, toDeg: 56, texels: 24, mapping: "bow-weighted" };
  out.push({ name: "lut radius json", endpoint: "lut", body: { scenario: COARSE, angles: lutAngles, sizes: { kind: "radius", fromUm: 60, toUm: 1500, texels: 3 } }, query: { format: "json" } });
  out.push({ name: "lut rain-rate exr", endpoint: "lut", body: { scenario: { ...COARSE, water: { temperatureC: 25, salinityPsu: 0 } }, angles: { ...lutAngles, mapping: "linear" }, sizes: { kind: "rain-rate", fromMmPerH: 1, toMmPerH: 20, texels: 2 }, space: "srgb-linear" }, query: { format: "exr" } });
  out.push({ name: "lut scenario hdr", endpoint: "lut", body: { scenario: SCENARIO, angles: lutAngles, sizes: { kind: "none" } }, query: { format: "hdr" } });
  out.push({ name: "lut scenario png16", endpoint: "lut", body: { scenario: SCENARIO, angles: lutAngles, sizes: { kind: "none" } }, query: { format: "png16" } });
  const camera = { widthPx: 64, heightPx: 36, horizontalFovDeg: 100, pitchDeg: 20 };
  for (const format of ["exr", "png", "png16", "manifest"]) {
    const query = format === "manifest" ? { format: "exr", part: "manifest" } : { format };
    out.push({ name: `view ${format}`, endpoint: "view", body: { scenario: SCENARIO, camera, polariserDeg: 10 }, query });
  }
  out.push({ name: "view hdr additive", endpoint: "view", body: { scenario: { ...SCENARIO, pathLengthM: 4000 }, camera: { ...camera, projection: "fisheye", horizontalFovDeg: 180 }, layer: "additive", output: { space: "acescg", normalise: "physical" } }, query: { format: "hdr" } });
  out.push({ name: "sky exr", endpoint: "sky", body: { scenario: SCENARIO, widthPx: 64, heightPx: 32, polariserToTangentDeg: 0 }, query: { format: "exr" } });
  out.push({ name: "sky manifest", endpoint: "sky", body: { scenario: { ...SCENARIO, water: { temperatureC: 16, salinityPsu: 35 }, spectral: { fromNm: 400, toNm: 700, stepNm: 20 } }, widthPx: 64, heightPx: 32 }, query: { part: "manifest" } });
  out.push({ name: "figure chromaticity", endpoint: "figure-chromaticity", body: RAIN });
  const sizeMap = { radiusFromUm: 50, radiusToUm: 800, radiusSteps: 3, angles: { fromDeg: 38, toDeg: 54, stepDeg: 0.5 } };
  out.push({ name: "figure size-map svg", endpoint: "figure-size-map", body: sizeMap });
  out.push({ name: "figure size-map png", endpoint: "figure-size-map", body: sizeMap, query: { format: "png" } });
  return out;
}

const SCATTER_CASES: [string, unknown][] = [
  ["scatter mie water", { radiusUm: 5, wavelengthNm: 550, method: "mie", scatteringAngles: { fromDeg: 130, toDeg: 145, stepDeg: 0.5 } }],
  ["scatter mie index", { radiusUm: 3, wavelengthNm: 600, refractiveIndex: { re: 1.333, im: 1e-8 }, method: "mie", scatteringAngles: { fromDeg: 0, toDeg: 180, stepDeg: 5 } }],
  ["scatter debye p2", { radiusUm: 5, wavelengthNm: 450, method: "debye", debyeOrder: 2, water: { temperatureC: 30, salinityPsu: 10 }, scatteringAngles: { fromDeg: 130, toDeg: 145, stepDeg: 0.5 } }],
  ["scatter airy", { radiusUm: 200, wavelengthNm: 650, method: "airy", scatteringAngles: { fromDeg: 125, toDeg: 145, stepDeg: 0.25 } }],
  ["scatter geometric", { radiusUm: 200, wavelengthNm: 500, method: "geometric", scatteringAngles: { fromDeg: 100, toDeg: 180, stepDeg: 2 } }],
];

function withoutVolatile(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(withoutVolatile);
  if (value && typeof value === "object") {
    return Object.fromEntries(Object.entries(value).filter(([k]) => !VOLATILE_KEYS.has(k)).map(([k, v]) => [k, withoutVolatile(v)]));
  }
  return value;
}

function sha256(bytes: Buffer | string): string {
  return createHash("sha256").update(bytes).digest("hex");
}

function jsonHash(value: unknown): string {
  return sha256(JSON.stringify(withoutVolatile(value)));
}

function bodyHash(contentType: string, body: Buffer): string {
  return contentType.startsWith("application/json") ? jsonHash(JSON.parse(body.toString("utf8"))) : sha256(body);
}

function headersHash(headers: Record<string, string>): string {
  const kept = Object.entries(headers).filter(([k]) => !VOLATILE_HEADERS.has(k)).sort(([a], [b]) => a.localeCompare(b));
  return sha256(JSON.stringify(kept));
}

async function main(): Promise<void> {
  const pool = createInlinePool();
  const only = process.argv.slice(2).find((a) => !a.startsWith("--"));
  const mieSampling: MieSampling = process.argv.includes("--mie-sampling=lattice") ? "lattice" : "adaptive";
  for (const c of cases()) {
    if (only && !c.name.includes(only)) continue;
    const renderer = builtInRenderers[c.endpoint];
    // A fresh kernel cache per case: each output is computed the same way whichever cases ran before it.
    const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: pool.compute, mieSampling });
    const output = await renderer.render(renderer.body.parse(c.body), renderer.query.parse(c.query ?? {}), { kernels, maxTermAngles: Infinity });
    console.log(`${c.name}\tbody ${bodyHash(output.contentType, output.body)}\theaders ${headersHash(output.headers)}`);
  }
  for (const [name, body] of SCATTER_CASES) {
    if (only && !name.includes(only)) continue;
    console.log(`${name}\tbody ${jsonHash(computeScatter(scatterRequestSchema.parse(body)))}`);
  }
  for (const wavelengthNm of [380, 555, 780]) {
    const query = waterQuerySchema.parse({ wavelengthNm, temperatureC: 10, salinityPsu: wavelengthNm === 555 ? 35 : 0 });
    console.log(`water ${wavelengthNm} nm\tbody ${jsonHash(waterIndex(query))}`);
  }
  await pool.close();
}

await main();
