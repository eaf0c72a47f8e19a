// Lookup textures: rows of bow profiles (one per drop size or rain rate) sampled at texel angles, as linear
// radiance in a linear space, with the rain curtain's opacity 1 − T in alpha.

import type { LutRequest } from "../../schemas/lut.js";
import { profileDefaults, type ProfileRequest } from "../../schemas/profile.js";
import { angleAtU, texelAngles, logAxisValues, BOW_WEIGHTED_CENTRE_DEG, BOW_WEIGHTED_SCALE_DEG } from "../../lib/lut/texel-mapping.js";
import { CURTAIN_WAVELENGTH_NM, curtainTransmittance } from "../../lib/bow/extinction.js";
import { computeProfile, requestHash, type ProfileDeps, type ProfileResult } from "./profile.js";
import { rowsProgress } from "../progress/rows-progress.js";
import { AUTO_MIE_BUDGET_TERM_ANGLES } from "../../lib/bow/engine-choice.js";
import type { LutManifest } from "../../schemas/responses/lut-response.js";
import type { ProgressListener } from "../progress/progress-meter.js";

/** Density of liquid water for the number density of a row at given liquid water content (common practice). */
const WATER_DENSITY_G_PER_M3 = 1e6;

export interface Lut {
  width: number;
  height: number;
  /** RGBA per texel, row-major from the top row (row j = size j, ascending). */
  rgba: Float32Array;
  manifest: LutManifest;
}

function rowDrops(request: LutRequest): { label: string; value: number; drops: ProfileRequest["drops"] }[] {
  const sizes = request.sizes;
  // Flattened drops keep their shape on every row of the size axis.
  const shape = request.scenario.drops?.shape;
  const shaped = shape ? { shape } : {};
  if (sizes.kind === "radius") {
    return Array.from(logAxisValues(sizes.fromUm, sizes.toUm, sizes.texels), (radiusUm) => ({
      label: "radiusUm",
      value: radiusUm,
      drops: {
        kind: "monodisperse" as const,
        ...shaped,
        radiusUm,
        numberPerM3: sizes.liquidWaterGPerM3 / (WATER_DENSITY_G_PER_M3 * (4 / 3) * Math.PI * (radiusUm * 1e-6) ** 3),
      },
    }));
  }
  if (sizes.kind === "rain-rate") {
    return Array.from(logAxisValues(sizes.fromMmPerH, sizes.toMmPerH, sizes.texels), (rainRateMmPerH) => ({
      label: "rainRateMmPerH",
      value: rainRateMmPerH,
      drops: { kind: "marshall-palmer" as const, rainRateMmPerH, ...shaped },
    }));
  }
  const drops = request.scenario.drops ?? profileDefaults.drops;
  return [{ label: "scenario", value: 0, drops }];
}

/** The finest texel spacing of the angle axis sets the profile's step. */
function profileStepDeg(request: LutRequest): number {
  const a = request.angles;
  let finest = Infinity;
  for (let i = 0; i < a.texels; i++) {
    finest = Math.min(finest, Math.abs(angleAtU(a, (i + 1) / a.texels) - angleAtU(a, i / a.texels)));
  }
  return Math.max(0.002, Math.min(0.1, finest / 2));
}

export async function computeLut(request: LutRequest, deps: ProfileDeps, onProgress?: ProgressListener): Promise<Lut> {
  const started = performance.now();
  const texelPsi = texelAngles(request.angles);
  const step = profileStepDeg(request);
  const from = Math.max(0, request.angles.fromDeg - step);
  const to = Math.min(180, request.angles.toDeg + step);
  const rows = rowDrops(request);
  const width = request.angles.texels;
  const height = rows.length;
  const rgba = new Float32Array(width * height * 4);
  const warnings = new Set<string>();
  let first: ProfileResult | undefined;
  const transmittance: number[] = [];
  // The rows share auto's Mie budget, so that a texture costs about what one profile does.
  const resolution = { autoMieBudgetTermAngles: AUTO_MIE_BUDGET_TERM_ANGLES / rows.length };
  const rowBody = (j: number): ProfileRequest => ({
    ...profileDefaults,
    ...request.scenario,
    drops: rows[j].drops,
    angles: { fromDeg: from, toDeg: from + Math.ceil((to - from) / step) * step, stepDeg: step },
    output: { ...profileDefaults.output, space: request.space, gamut: "clip", normalise: "physical", white: "sun" },
  });
  const progress = onProgress ? rowsProgress(rows.length, (j) => [rowBody(j), resolution], deps.kernels.parallelism, onProgress) : undefined;

  for (let j = 0; j < rows.length; j++) {
    const body = rowBody(j);
    const part = progress?.part(j);
    const profile = await computeProfile(body, { ...deps, progress: part }, resolution);
    part?.done();
    first ??= profile;
    for (const w of profile.meta.warnings) warnings.add(w);
    const t = curtainTransmittance(profile.quadrature, body.water, body.pathLengthM).transmittance;
    transmittance.push(t);
    const a = profile.spectral.anglesDeg;
    for (let i = 0; i < width; i++) {
      const position = (texelPsi[i] - a[0]) / body.angles.stepDeg;
      const k = Math.min(a.length - 2, Math.max(0, Math.floor(position)));
      const f = position - k;
      const o = 4 * (j * width + i);
      for (let c = 0; c < 3; c++) rgba[o + c] = profile.colour.rgb[3 * k + c] * (1 - f) + profile.colour.rgb[3 * (k + 1) + c] * f;
      rgba[o + 3] = 1 - t;
    }
  }

  progress?.meter.done();
  const mapping = request.angles.mapping;
  const manifest: LutManifest = {
    width,
    height,
    channels: ["R", "G", "B", "A"],
    rowOrder: "row 0 is the top of the image and holds size 0 (the smallest); v = (row + 0.5) / height",
    u: {
      quantity: "angle ψ between the view ray and the antisolar direction",
      unit: "degree",
      mapping,
      fromDeg: request.angles.fromDeg,
      toDeg: request.angles.toDeg,
      formula:
        mapping === "linear"
          ? "ψ = fromDeg + u·(toDeg − fromDeg)"
          : "ψ = c + s·sinh(a0 + u·(a1 − a0)), a0 = asinh((fromDeg − c)/s), a1 = asinh((toDeg − c)/s)",
      ...(mapping === "bow-weighted" ? { centreDeg: BOW_WEIGHTED_CENTRE_DEG, scaleDeg: BOW_WEIGHTED_SCALE_DEG } : {}),
      texelCentresDeg: Array.from(texelPsi, (v) => Number(v.toFixed(6))),
    },
    v: {
      quantity: rows[0].label === "scenario" ? "the scenario's drops (one row)" : rows[0].label,
      mapping: rows.length > 1 ? "logarithmic: value = from·(to/from)^v" : "single row",
      values: rows.map((r) => Number(r.value.toPrecision(6))),
      transmittance: transmittance.map((t) => Number(t.toPrecision(6))),
    },
    colourSpace: request.space,
    transferFunction: "linear",
    white: "the sun's light maps to the space's white",
    scale: "RGB are physical: texel × 1 gives luminance-weighted radiance with Y in cd/m² (the bow alone, without sky)",
    alpha: `1 − T, the rain curtain's opacity at ${CURTAIN_WAVELENGTH_NM} nm (T = exp(−τ)); composite as premultiplied over: out = rgb + (1 − a)·background`,
    additiveUse: "or add rgb to the plate's radiance and ignore alpha (thin rain)",
    scenario: request,
    hash: requestHash(request),
    sources: first?.meta.sources ?? [],
    warnings: [...warnings],
    computeMs: Math.round(performance.now() - started),
  };
  return { width, height, rgba, manifest };
}
