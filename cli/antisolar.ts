#!/usr/bin/env node
// antisolar's command line: bake lookup textures and render profiles without running a server, or serve.
//   antisolar bake <lut-request.json> -o <file.exr|.ktx2|.hdr|.png|.json>
//   antisolar render <profile-request.json> -o <file.json|.png|.svg>
//   antisolar serve
import { readFile, writeFile } from "node:fs/promises";
import { extname } from "node:path";
import { parseArgs } from "node:util";
import { z } from "zod";
import { lutQuerySchema, lutRequestSchema } from "../schemas/lut.js";
import { profileRequestSchema } from "../schemas/profile.js";
import { stripQuerySchema } from "../schemas/formats.js";
import { resolveLutRequest } from "../pipeline/sky/resolve-source.js";
import { progressBar } from "./progress-bar.js";
import { computeLutForQuery, encodeLut } from "../pipeline/render/lut-render.js";
import { renderProfile, type ProfileFormat } from "../pipeline/render/profile-render.js";
import type { RenderDeps } from "../pipeline/render/render-output.js";
import type { Bows, ProfileResponse } from "../schemas/responses/profile-response.js";
import { sequenceCommand } from "./sequence-command.js";
import { createKernelRuntime } from "../pipeline/kernels/runtime.js";
import { loadConfig } from "../pipeline/config/config.js";
import { parseOrThrow } from "../pipeline/requests/parse-request.js";
import { ClientError } from "../pipeline/requests/client-error.js";
import { EYE_SAFETY_CAUTION } from "../pipeline/eye-safety.js";

const usage = `antisolar — physically based rainbows

${EYE_SAFETY_CAUTION}

  antisolar bake <lut-request.json> -o <texture.exr|.ktx2|.hdr|.png|.json>  bake a lookup texture (+ <file>.manifest.json)
  antisolar render <profile-request.json> -o <profile.json|.png|.svg>  render a bow profile
  antisolar sequence <job.json> -o <frames.tar>                         render a span of time as frames (the body of
                                                                        POST /v1/jobs with "sequence"), tar + manifest.json
  antisolar serve                                                       start the HTTP service (PORT, HOST)

Options:
  -o, --output <file>         the file to write; its extension picks the format
      --pixel-type half|float  bake: the EXR or KTX2 sample type (default half)
      --layers combined|by-order  bake: by-order adds the layers by scattering order to an EXR (reflection.R …)
      --height <px>           render: the PNG strip's height (default 32)
  -h, --help                  this text

Request files use the same JSON as POST /v1/lut and POST /v1/profile; "-" reads standard input; {} gives defaults.
The files are the bytes those endpoints answer for the same request, in the format the extension names.
The light may be given by a moment and a place ("sun": {"at": {"utc", "latitudeDeg", "longitudeDeg"}}) or be the
moon ("moon": {...}), and "output": {"vision": "eye"} renders for the eye at the scene's light level, as in the service.
Environment: WORKERS, CACHE_DIR, CACHE_BUDGET_MB as for the service.`;

/** The command line's options (node:util parseArgs); anything else is refused with the usage text. */
const cliOptions = {
  output: { type: "string", short: "o" },
  "pixel-type": { type: "string" },
  layers: { type: "string" },
  height: { type: "string" },
  help: { type: "boolean", short: "h" },
} as const;

type CliValues = ReturnType<typeof parseArgs<{ options: typeof cliOptions; allowPositionals: true }>>["values"];

/** A mistake in the command line itself: the message is followed by the usage text. */
class UsageError extends Error {}

/** Output extensions of `bake`, as ?format= of POST /v1/lut. */
const LUT_FORMATS: Readonly<Record<string, z.output<typeof lutQuerySchema>["format"]>> = { ".exr": "exr", ".ktx2": "ktx2", ".hdr": "hdr", ".png": "png16", ".json": "json" };
/** Output extensions of `render`, as ?format= of POST /v1/profile. */
const PROFILE_FORMATS: Readonly<Record<string, ProfileFormat>> = { ".json": "json", ".png": "png16", ".svg": "svg" };

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

/** Runs one command's work on its own kernel threads, closed when it ends. */
async function withKernels<T>(work: (deps: RenderDeps) => Promise<T>): Promise<T> {
  const runtime = createKernelRuntime(oneShotConfig());
  try {
    return await work({ kernels: runtime.kernels, maxTermAngles: Infinity });
  } finally {
    await runtime.close();
  }
}

/** The file the extension names, or a clear refusal listing those there are. */
function formatFor<F>(output: string, formats: Readonly<Record<string, F>>): F {
  const ext = extname(output).toLowerCase();
  const format = formats[ext];
  if (format === undefined) throw new UsageError(`unknown output type '${ext}': use ${Object.keys(formats).join(", ")}`);
  return format;
}

/** The LUT as POST /v1/lut encodes it (pipeline/render/lut-render.ts), plus its manifest beside it. */
async function bake(input: string | undefined, values: CliValues): Promise<void> {
  const output = values.output;
  if (!input || !output) throw new UsageError("bake needs a request file and -o <file>");
  const query = parseOrThrow(lutQuerySchema, { format: formatFor(output, LUT_FORMATS), pixelType: values["pixel-type"], layers: values.layers }, "query");
  const resolved = resolveLutRequest(parseOrThrow(lutRequestSchema, await readJson(input), "body"));
  await withKernels(async (deps) => {
    const lut = await computeLutForQuery(resolved.body, query, { kernels: deps.kernels, limits: { maxTermAngles: deps.maxTermAngles } }, progressBar("baking"));
    const file = await encodeLut(lut, resolved, query);
    // PNG holds 0..1: the route states the divisor in a header, the CLI in the manifest beside the file.
    const scale = file.headers["x-antisolar-scale"];
    const manifest = scale === undefined ? lut.manifest : { ...lut.manifest, pngScale: `RGB were divided by ${scale} to fit PNG's 0..1` };
    await writeFile(output, file.body);
    await writeFile(`${output}.manifest.json`, JSON.stringify(manifest, null, 2));
    console.log(`wrote ${output} (${lut.width}×${lut.height}) and ${output}.manifest.json`);
  });
}

/** The profile as POST /v1/profile renders it (pipeline/render/profile-render.ts). */
async function render(input: string | undefined, values: CliValues): Promise<void> {
  const output = values.output;
  if (!input || !output) throw new UsageError("render needs a request file and -o <file>");
  const format = formatFor(output, PROFILE_FORMATS);
  const query = parseOrThrow(stripQuerySchema, { height: values.height }, "query");
  const request = parseOrThrow(profileRequestSchema, await readJson(input), "body");
  await withKernels(async (deps) => {
    const file = await renderProfile(request, format, query, { ...deps, onProgress: progressBar("rendering") });
    await writeFile(output, file.body);
    // The images carry the bows in a header, the JSON in its body.
    const bows: Bows = format === "json" ? (JSON.parse(file.body.toString("utf8")) as ProfileResponse).bows : (JSON.parse(file.headers["x-antisolar-bows"]) as Bows);
    console.log(`wrote ${output}: primary ${bowAngleText(bows.primaryDeg)}, secondary ${bowAngleText(bows.secondaryDeg)}`);
  });
}

/** A span of time: the body of POST /v1/jobs with "sequence", rendered here (cli/sequence-command.ts). */
async function sequence(input: string | undefined, values: CliValues): Promise<void> {
  const output = values.output;
  if (!input || !output) throw new UsageError("sequence needs a job file and -o <file.tar>");
  const job = await readJson(input);
  await withKernels(async (deps) => console.log(await sequenceCommand(job, output, deps.kernels)));
}

async function main(): Promise<void> {
  const { values, positionals } = parseArgs({ args: process.argv.slice(2), options: cliOptions, allowPositionals: true, strict: true });
  const [command, input, ...extra] = positionals;
  if (values.help || command === undefined || command === "help") {
    console.log(usage);
    return;
  }
  if (extra.length > 0) throw new UsageError(`unexpected argument '${extra[0]}'`);
  switch (command) {
    case "bake":
      return bake(input, values);
    case "render":
      return render(input, values);
    case "sequence":
      return sequence(input, values);
    case "serve":
      await import("../http/main.js");
      return;
    default:
      throw new UsageError(`unknown command '${command}'`);
  }
}

/** parseArgs reports an unknown option or a missing value as a TypeError with an ERR_PARSE_ARGS_* code. */
function isParseArgsError(error: unknown): error is Error {
  return error instanceof Error && String((error as NodeJS.ErrnoException).code ?? "").startsWith("ERR_PARSE_ARGS");
}

main().catch((error: unknown) => {
  if (error instanceof UsageError || isParseArgsError(error)) console.error(`antisolar: ${error.message}\n\n${usage}`);
  else if (error instanceof ClientError) console.error(`antisolar: ${error.message}`);
  else if (error instanceof z.ZodError || error instanceof SyntaxError) console.error(`antisolar: ${error.message}`);
  else console.error(`antisolar: ${error instanceof Error ? error.message : String(error)}`);
  process.exitCode = 1;
});

/** A bow's angle for the summary line, or "none" where the profile has no such bow. */
function bowAngleText(angleDeg: number | null | undefined): string {
  return angleDeg === null || angleDeg === undefined ? "none" : `${angleDeg}°`;
}
