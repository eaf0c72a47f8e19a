#!/usr/bin/env node
// antisolar's command line: bake lookup textures and render profiles without running a server, or serve.
//   antisolar bake <lut-request.json> -o <file.exr|.hdr|.png|.json>
//   antisolar render <profile-request.json> -o <file.json|.png>
//   antisolar serve
import { readFile, writeFile } from "node:fs/promises";
import { extname } from "node:path";
import { z } from "zod";
import { lutRequestSchema } from "../schemas/lut.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { computeLut } from "../pipeline/compute/lut.js";
import { computeProfile, PROFILE_STAGES } from "../pipeline/compute/profile.js";
import { ProgressMeter } from "../pipeline/progress/progress-meter.js";
import { progressBar } from "./progress-bar.js";
import { profileJson } from "../pipeline/render/profile-render.js";
import { annotate, resolveLutRequest, resolveProfileRequest } from "../pipeline/sky/resolve-source.js";
import { encodeExr } from "../pipeline/encoders/exr.js";
import { encodeRadianceHdr } from "../pipeline/encoders/radiance-hdr.js";
import { encodePngImage, encodePngStrip } from "../pipeline/encoders/png-strip.js";
import { spacePrimaries } from "../lib/colour/primaries.js";
import { createKernelRuntime } from "../pipeline/kernels/runtime.js";
import { loadConfig } from "../pipeline/config/config.js";
import { parseOrThrow } from "../pipeline/requests/parse-request.js";
import { ClientError } from "../pipeline/requests/client-error.js";
import { EYE_SAFETY_CAUTION } from "../pipeline/eye-safety.js";

const usage = `antisolar — physically based rainbows

${EYE_SAFETY_CAUTION}

  antisolar bake <lut-request.json> -o <texture.exr|.hdr|.png|.json>   bake a lookup texture (+ <file>.manifest.json)
  antisolar render <profile-request.json> -o <profile.json|.png>       render a bow profile
  antisolar serve                                                       start the HTTP service (PORT, HOST)

Request files use the same JSON as POST /v1/lut and POST /v1/profile; "-" reads standard input; {} gives defaults.
Environment: WORKERS, CACHE_DIR, CACHE_BUDGET_MB as for the service.`;

function argument(args: string[], flag: string): string | undefined {
  const i = args.indexOf(flag);
  return i >= 0 ? args[i + 1] : undefined;
}

async function readJson(path: string): Promise<unknown> {
  const text = path === "-" ? await new Promise<string>((resolve) => {
    let data = "";
    process.stdin.on("data", (c) => (data += c));
    process.stdin.on("end", () => resolve(data));
  }) : await readFile(path, "utf8");
  return JSON.parse(text);
}

/** A one-shot command's threads start on its own work: warming them up first would only delay it. */
function oneShotConfig() {
  return { ...loadConfig(process.env), workerWarmUpRounds: 0 };
}

async function bake(args: string[]): Promise<void> {
  const input = args[0];
  const output = argument(args, "-o");
  if (!input || !output) throw new Error(`bake needs a request file and -o <file>\n\n${usage}`);
  const resolved = resolveLutRequest(parseOrThrow(lutRequestSchema, await readJson(input), "body"));
  const request = resolved.body;
  const runtime = createKernelRuntime(oneShotConfig());
  try {
    const lut = await computeLut(request, { kernels: runtime.kernels, limits: { maxTermAngles: Infinity } }, progressBar("baking"));
    annotate(lut.manifest, resolved);
    const ext = extname(output).toLowerCase();
    let file: Buffer;
    if (ext === ".exr") {
      file = encodeExr({ width: lut.width, height: lut.height, channels: ["R", "G", "B", "A"], data: lut.rgba, pixelType: "half", compression: "zip",
        chromaticities: request.space === "xyz-d65" ? undefined : spacePrimaries(request.space), attributes: { "antisolar:space": request.space, "antisolar:hash": String(lut.manifest.hash) } });
    } else if (ext === ".hdr") {
      const rgb = new Float32Array(lut.width * lut.height * 3);
      for (let p = 0; p < lut.width * lut.height; p++) rgb.set(lut.rgba.subarray(4 * p, 4 * p + 3), 3 * p);
      const c = spacePrimaries(request.space);
      file = encodeRadianceHdr({ width: lut.width, height: lut.height, data: rgb, primaries: [c.red, c.green, c.blue, c.white] });
    } else if (ext === ".png") {
      let peak = 0;
      lut.rgba.forEach((v, k) => (peak = k % 4 === 3 ? peak : Math.max(peak, v)));
      const scaled = Float32Array.from(lut.rgba, (v, k) => (k % 4 === 3 ? v : peak > 0 ? v / peak : 0));
      file = (await encodePngImage({ width: lut.width, height: lut.height, channels: 4, values: scaled, bitDepth: 16, space: request.space })).png;
      (lut.manifest as typeof lut.manifest & { pngScale?: string }).pngScale = `RGB were divided by ${peak} to fit PNG's 0..1`;
    } else if (ext === ".json") {
      file = Buffer.from(JSON.stringify({ manifest: lut.manifest, rgba: Array.from(lut.rgba) }));
    } else {
      throw new Error(`unknown output type '${ext}': use .exr, .hdr, .png or .json`);
    }
    await writeFile(output, file);
    await writeFile(`${output}.manifest.json`, JSON.stringify(lut.manifest, null, 2));
    console.log(`wrote ${output} (${lut.width}×${lut.height}) and ${output}.manifest.json`);
  } finally {
    await runtime.close();
  }
}

async function render(args: string[]): Promise<void> {
  const input = args[0];
  const output = argument(args, "-o");
  if (!input || !output) throw new Error(`render needs a request file and -o <file>\n\n${usage}`);
  const resolved = resolveProfileRequest(parseOrThrow(profileRequestSchema, await readJson(input), "body"));
  const request = resolved.body;
  const runtime = createKernelRuntime(oneShotConfig());
  try {
    const bar = progressBar("rendering");
    const progress = new ProgressMeter(PROFILE_STAGES, bar);
    const result = await computeProfile(request, { kernels: runtime.kernels, limits: { maxTermAngles: Infinity }, progress });
    annotate(result.meta, resolved);
    progress.done();
    const ext = extname(output).toLowerCase();
    if (ext === ".png") {
      await writeFile(output, (await encodePngStrip({ values: result.colour.rgb, height: 32, bitDepth: 16, space: request.output.space })).png);
    } else if (ext === ".json") {
      await writeFile(output, JSON.stringify(profileJson(result)));
    } else {
      throw new Error(`unknown output type '${ext}': use .json or .png`);
    }
    console.log(`wrote ${output}: primary ${result.bows.primaryDeg ?? "none"}°, secondary ${result.bows.secondaryDeg ?? "none"}°`);
  } finally {
    await runtime.close();
  }
}

async function main(): Promise<void> {
  const [command, ...args] = process.argv.slice(2);
  switch (command) {
    case "bake":
      return bake(args);
    case "render":
      return render(args);
    case "serve":
      await import("../http/main.js");
      return;
    case undefined:
    case "help":
    case "--help":
    case "-h":
      console.log(usage);
      return;
    default:
      throw new Error(`unknown command '${command}'\n\n${usage}`);
  }
}

main().catch((error: unknown) => {
  if (error instanceof ClientError) console.error(`antisolar: ${error.message}`);
  else if (error instanceof z.ZodError || error instanceof SyntaxError) console.error(`antisolar: ${error.message}`);
  else console.error(`antisolar: ${error instanceof Error ? error.message : String(error)}`);
  process.exitCode = 1;
});
