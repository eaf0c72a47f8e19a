// Lookup textures: rows of bow profiles (one per drop size or rain rate) sampled at texel angles, as linear
// radiance in a linear space, with the rain curtain's opacity 1 − T in alpha.

import type { LutRequest } from "../../schemas/lut.js";
import { profileDefaults, type ProfileRequest } from "../../schemas/profile.js";
import { angleAtU, texelAngles, logAxisValues, BOW_WEIGHTED_CENTRE_DEG, BOW_WEIGHTED_SCALE_DEG } from "../../lib/lut/texel-mapping.js";
import { CURTAIN_WAVELENGTH_NM, curtainTransmittance } from "../../lib/bow/extinction.js";
import { planProfile, refuseTooCostly, profileSources, profileWarnings, requestHash, sunColourWeights, sunLightFor, sunlitLinearRgb, sunlitXyz, unitRadianceFor, unitSpectralProfile, type ProfileDeps, type ProfileLayers } from "./profile.js";
import { ORDER_LAYERS } from "../../lib/bow/scattering-orders.js";
import { orderLayersManifest } from "./order-layers.js";
import { sharedKernelRows } from "../kernels/shared-rows.js";
import { withSiblingArcs } from "./sibling-arcs.js";
import { discKernels } from "../../lib/bow/lattice-profile.js";
import { COST_NS } from "../progress/work-costs.js";
import { laterWorkNs } from "../progress/profile-work.js";
import { AUTO_MIE_BUDGET_TERM_ANGLES } from "../../lib/bow/engine-choice.js";
import type { LutManifest } from "../../schemas/responses/lut-response.js";
import { ProgressMeter, type ProgressListener } from "../progress/progress-meter.js";

/** Density of liquid water for the number density of a row at given liquid water content (common practice). */
const WATER_DENSITY_G_PER_M3 = 1e6;

export interface Lut {
  width: number;
  height: number;
  /** RGBA per texel, row-major from the top row (row j = size j, ascending). */
  rgba: Float32Array;
  /** layers "by-order": each named order's RGB per texel (ORDER_LAYERS' order), with the whole texture's colour handling. */
  orders?: Float32Array[];
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

/** Where each texel reads the profile: the two output samples about it and the weight of the upper one. */
interface TexelReads {
  /** The output samples any texel reads, ascending (the spectral pass computes only these). */
  samples: Int32Array;
  /** Per texel: the position in `samples` of the lower sample (the upper one follows it). */
  lower: Int32Array;
  fraction: Float64Array;
}

function texelReads(texelPsi: Float64Array, angles: { fromDeg: number; stepDeg: number; count: number }): TexelReads {
  const k = new Int32Array(texelPsi.length);
  const fraction = new Float64Array(texelPsi.length);
  const wanted = new Set<number>();
  texelPsi.forEach((psi, i) => {
    const position = (psi - angles.fromDeg) / angles.stepDeg;
    k[i] = Math.min(angles.count - 2, Math.max(0, Math.floor(position)));
    fraction[i] = position - k[i];
    wanted.add(k[i]).add(k[i] + 1);
  });
  const samples = Int32Array.from([...wanted].sort((x, y) => x - y));
  const at = new Map(Array.from(samples, (s, j) => [s, j]));
  return { samples, lower: k.map((s) => at.get(s)!), fraction };
}

/** The stages of a texture's progress: the shared kernels and spectral sums, then one colour stage per sun. */
export function lutStages(sunStages: readonly string[]): string[] {
  return ["kernels", "spectral", ...sunStages];
}

/**
 * Textures of one scenario under several suns (requests that differ only in scenario.sun.elevationDeg): the
 * kernels and the spectral sums per unit sunlight (sun disc included) are computed once per row, then each sun
 * re-weights them by its own spectrum and takes the colour sums. A single texture is the case of one sun, so a
 * time-of-day slice and the single-elevation texture at its elevation come from the same operations, to the bit.
 */
export async function computeLutsAcrossSun(
  requests: readonly LutRequest[],
  deps: ProfileDeps,
  progress: ProgressMeter,
  sunStages: readonly string[],
  layers: ProfileLayers = "combined",
  siblingArcsDeg?: readonly number[],
): Promise<Lut[]> {
  const started = performance.now();
  const request = requests[0];
  const texelPsi = texelAngles(request.angles);
  const step = profileStepDeg(request);
  const from = Math.max(0, request.angles.fromDeg - step);
  const to = Math.min(180, request.angles.toDeg + step);
  const rows = rowDrops(request);
  const width = request.angles.texels;
  const height = rows.length;
  const bodyOf = (r: LutRequest, j: number): ProfileRequest => ({
    ...profileDefaults,
    ...r.scenario,
    drops: rows[j].drops,
    angles: { fromDeg: from, toDeg: from + Math.ceil((to - from) / step) * step, stepDeg: step },
    output: { ...profileDefaults.output, space: r.space, gamut: "clip", normalise: "physical", white: "sun" },
  });
  // The rows share auto's Mie budget, so that a texture costs about what one profile does (without the share rule,
  // which would let every row's Mie work grow past its part of the budget).
  const resolution = { autoMieBudgetTermAngles: AUTO_MIE_BUDGET_TERM_ANGLES / rows.length, autoMaxAiryShare: 1 };
  const plans = rows.map((_, j) => planProfile(bodyOf(request, j), resolution, layers));
  for (const plan of plans) refuseTooCostly(plan, deps.limits);
  const reads = texelReads(texelPsi, plans[0].angles);
  const nl = plans[0].grid.count;
  // The spectral pass computes only the samples the texels read: its estimated cost scales with their share.
  const share = reads.samples.length / plans[0].angles.count;
  const rowNs = plans.map((p) => laterWorkNs(p.request, p).spectralNs * share);
  const rowsBeforeNs = rowNs.map((_, j) => rowNs.slice(0, j).reduce((a, b) => a + b, 0));
  progress.plan("spectral", rowNs.reduce((a, b) => a + b, 0));
  for (const stage of sunStages) progress.plan(stage, rows.length * reads.samples.length * nl * COST_NS.colourSample);

  const kernelRows = await sharedKernelRows(
    deps.kernels,
    plans.map((p) => (siblingArcsDeg ? withSiblingArcs(p.kernelRequest, siblingArcsDeg) : p.kernelRequest)),
    deps.signal,
    {
      saveEachTask: deps.saveEachTask,
      onRows: (doneNs, totalNs, found) => {
        progress.plan("kernels", totalNs);
        progress.advance("kernels", doneNs, { found });
      },
    },
  );
  // Every row shares the grid, the lattice and the sun's disc, so the disc's kernels are made once.
  const first = plans[0];
  const disc = discKernels(first.grid, first.request.sun.discDeg, first.span.h, first.request.sun.limbDarkening);
  const units: Float64Array[] = [];
  for (let j = 0; j < rows.length; j++) {
    const unit = await unitSpectralProfile(plans[j], kernelRows[j], { disc, samples: reads.samples, onWavelength: (ns) => progress.advance("spectral", rowsBeforeNs[j] + ns * share) });
    units.push(unitRadianceFor(plans[j], unit));
  }
  // By order: each named order's rows (cached apart, lib/bow/scattering-orders.ts) through the same spectral pass.
  const orderUnits: Float64Array[][] = [];
  for (const { order } of layers === "by-order" ? ORDER_LAYERS : []) {
    const orderRows = await sharedKernelRows(deps.kernels, plans.map((p) => ({ ...p.kernelRequest, order })), deps.signal, { saveEachTask: deps.saveEachTask });
    const perRow: Float64Array[] = [];
    for (let j = 0; j < rows.length; j++) perRow.push(unitRadianceFor(plans[j], await unitSpectralProfile(plans[j], orderRows[j], { disc, samples: reads.samples })));
    orderUnits.push(perRow);
  }
  const transmittance = plans.map((p) => curtainTransmittance(p.quadrature, p.request.water, p.request.pathLengthM).transmittance);

  const luts: Lut[] = [];
  for (const [s, r] of requests.entries()) {
    // Between suns, other requests may run.
    if (s > 0) await new Promise<void>((resolve) => setImmediate(resolve));
    const rgba = new Float32Array(width * height * 4);
    const orders = orderUnits.map(() => new Float32Array(width * height * 3));
    const warnings = new Set<string>();
    // One sun for every row (the rows differ in their drops only).
    const light = sunLightFor(plans[0], bodyOf(r, 0).sun);
    const weights = sunColourWeights(plans[0], light);
    // Every row's colour in one pass through the output space (the sun's white adaptation is made once per sun):
    // the rows share the observer, space and white, and differ in their drops only. The orders go the same way.
    const samples = reads.samples.length;
    const rowsRgb = (rowUnits: Float64Array[]): Float64Array => {
      const xyz = new Float64Array(3 * samples * rows.length);
      for (let j = 0; j < rows.length; j++) xyz.set(sunlitXyz(rowUnits[j], weights), 3 * samples * j);
      return sunlitLinearRgb(plans[0], xyz, light);
    };
    /** Row j of a rowsRgb result read at texel i (linear between its two samples), channel c. */
    const texel = (rgb: Float64Array, j: number, i: number, c: number): number => {
      const at = 3 * (samples * j + reads.lower[i]) + c;
      return rgb[at] * (1 - reads.fraction[i]) + rgb[at + 3] * reads.fraction[i];
    };
    const rgbAll = rowsRgb(units);
    const ordersRgb = orderUnits.map(rowsRgb);
    for (let j = 0; j < rows.length; j++) {
      for (const w of profileWarnings(plans[j], light)) warnings.add(w);
      for (let i = 0; i < width; i++) {
        const o = 4 * (j * width + i);
        for (let c = 0; c < 3; c++) rgba[o + c] = texel(rgbAll, j, i, c);
        rgba[o + 3] = 1 - transmittance[j];
        ordersRgb.forEach((rgb, p) => {
          for (let c = 0; c < 3; c++) orders[p][3 * (j * width + i) + c] = texel(rgb, j, i, c);
        });
      }
      progress.advance(sunStages[s], (j + 1) * reads.samples.length * nl * COST_NS.colourSample);
    }
    const manifest = lutManifest(r, rows, texelPsi, transmittance, [...warnings], plans[0].request, started);
    if (orders.length) luts.push({ width, height, rgba, manifest: { ...manifest, layers: orderLayersManifest(["R", "G", "B", "A"]) }, orders });
    else luts.push({ width, height, rgba, manifest });
  }
  return luts;
}

/** siblingArcsDeg: the arc positions of the slices of a texture along the arc, whose rows this one's pass also gives (sibling-arcs.ts). */
export async function computeLut(request: LutRequest, deps: ProfileDeps, onProgress?: ProgressListener, layers: ProfileLayers = "combined", siblingArcsDeg?: readonly number[]): Promise<Lut> {
  const stages = lutStages(["colour"]);
  const progress = new ProgressMeter(stages, onProgress);
  const [lut] = await computeLutsAcrossSun([request], deps, progress, ["colour"], layers, siblingArcsDeg);
  progress.done();
  return lut;
}

function lutManifest(
  request: LutRequest,
  rows: ReturnType<typeof rowDrops>,
  texelPsi: Float64Array,
  transmittance: number[],
  warnings: string[],
  firstBody: ProfileRequest,
  started: number,
): LutManifest {
  const width = request.angles.texels;
  const height = rows.length;
  const mapping = request.angles.mapping;
  return {
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
    sources: profileSources(firstBody),
    warnings,
    computeMs: Math.round(performance.now() - started),
  };
}
