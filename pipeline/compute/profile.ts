// Turns a validated profile request into the core's inputs, runs it, and shapes the JSON answer.

import { LRUCache } from "lru-cache";
import { contentHash } from "../requests/content-hash.js";
import type { ProfileRequest } from "../../schemas/profile.js";
import { angleCount } from "../../schemas/angles.js";
import { makeWavelengthGrid, wavelengthsNm } from "../../lib/spectra/grid.js";
import { dropMedia } from "../../lib/water/drop-medium.js";
import type { DropSizeDistribution } from "../../lib/drops/distributions.js";
import { fractionOfCrossSectionAbove, type RadiusQuadrature } from "../../lib/drops/quadrature.js";
import { latticeRadiusQuadrature, type ThinningLevel } from "../../lib/drops/lattice-quadrature.js";
import { spectrumToXyz, type Xyz } from "../../lib/colour/tristimulus.js";
import { directSunlight } from "../../lib/bow/sunlight.js";
import type { SpectralProfile } from "../../lib/bow/lattice-profile.js";
import { latticeUnitProfilePass, sunlitProfile, polarisedUnitRadiance, discKernels, profileSpan, accumulateBlocks } from "../../lib/bow/lattice-profile.js";
import { blocksOf, kernelStepFor, type LatticeSpan } from "../../lib/bow/kernel-grid.js";
import type { KernelRequest, KernelRows, KernelService, KernelStats, PopulationSums } from "../kernels/kernel-service.js";
import { ORDER_LAYERS, type OrderLayerName } from "../../lib/bow/scattering-orders.js";
import type { DiscKernel } from "../../lib/sun/disc.js";
import { colourProfile, linearRgbOfXyz, polariserWeights, sunlitXyzWeights, weightedXyz, type ColourOptions, type ColourProfile } from "../../lib/bow/colour-profile.js";
import { findBows, findBowsByDispersion } from "../../lib/bow/bow-peaks.js";
import { AUTO_MIE_BUDGET_TERM_ANGLES, autoEngine, chooseAutoEngine, engineChooser, type AutoChoice, estimateMieTermAngles, estimatedEngineError, AUTO_AIRY_FROM_RADIUS_UM } from "../../lib/bow/engine-choice.js";
import type { DropEngine } from "../../lib/bow/volume-scattering.js";
import { chooseRadiusDensity, type DensityChoice } from "../../lib/bow/radius-density.js";
import type { CellAverage } from "../../lib/bow/cell-average.js";
import type { WavelengthGrid } from "../../lib/spectra/grid.js";
import { ClientError } from "../requests/client-error.js";
import { planDropShapes, shapedCostTermAngles } from "./drop-shape-plan.js";
import { flattenedBowNotes } from "./flattened-bow-notes.js";
import type { Bows, EngineRange, ProfileMeta } from "../../schemas/responses/profile-response.js";
import type { ProgressMeter } from "../progress/progress-meter.js";
import { kernelWorkNs, laterWorkNs } from "../progress/profile-work.js";

/** The stages of a profile's progress, in order (a render adds its encoding after them: PROFILE_RENDER_STAGES). */
export const PROFILE_STAGES = ["kernels", "spectral", "colour"] as const;
import { sceneEyeAdaptation } from "../../lib/colour/low-light-vision.js";
import { visionMeta } from "./vision-meta.js";
import type { ShapedRowSpec } from "../../lib/bow/shaped-rows.js";

/** Drops above 1 mm radius flatten as they fall (Beard & Chuang 1987, J. Atmos. Sci. 44, 1509). */
const FLATTENED_FROM_RADIUS_UM = 1000;

/** One scattering order's share of a profile (lib/bow/scattering-orders.ts), from the same drops, sun and options. */
export interface OrderProfile {
  name: OrderLayerName;
  order: number;
  spectral: SpectralProfile;
  colour: ColourProfile;
}

/** combined: the whole light only; by-order: also each named scattering order's profile (ProfileResult.orders). */
export type ProfileLayers = "combined" | "by-order";

export interface ProfileResult {
  request: ProfileRequest;
  /** XYZ of the direct sunlight on the rain (any scale): the white under white = "sun". */
  sunWhite: Xyz;
  grid: WavelengthGrid;
  /** The drops on their radius nodes, computed once per request: the curtain's extinction reads them too. */
  quadrature: RadiusQuadrature;
  spectral: SpectralProfile;
  colour: ColourProfile;
  bows: Bows;
  meta: ProfileMeta;
  /** With layers "by-order": the named orders, in ORDER_LAYERS' order (the remainder is the whole minus their sum). */
  orders?: OrderProfile[];
}

export function toDistribution(drops: ProfileRequest["drops"]): DropSizeDistribution {
  switch (drops.kind) {
    case "monodisperse":
      return { kind: "monodisperse", radiusUm: drops.radiusUm, totalNumberPerM3: drops.numberPerM3 };
    case "marshall-palmer":
      return drops;
    case "gamma":
      return {
        kind: "gamma-d0",
        medianVolumeDiameterMm: drops.medianVolumeDiameterMm,
        mu: drops.mu,
        totalNumberPerM3: drops.totalNumberPerM3,
      };
    case "lognormal":
      return drops;
    case "histogram": {
      // Bin edges half-way (geometrically) between centres; the outer edges mirror the inner ones.
      const r = drops.bins.map((b) => b.radiusUm);
      const edgesUm: number[] = [];
      const ratio = r.length > 1 ? Math.sqrt(r[1] / r[0]) : 1.05;
      edgesUm.push(r[0] / ratio);
      for (let i = 1; i < r.length; i++) edgesUm.push(Math.sqrt(r[i - 1] * r[i]));
      const lastRatio = r.length > 1 ? Math.sqrt(r[r.length - 1] / r[r.length - 2]) : 1.05;
      edgesUm.push(r[r.length - 1] * lastRatio);
      return { kind: "histogram", edgesUm, numberPerM3: drops.bins.map((b) => b.numberPerM3) };
    }
  }
}

export function requestHash(request: unknown): string {
  return contentHash(request);
}

/** The direct sunlight on the rain for a request, on its wavelength grid. */
export function sunlightFor(request: ProfileRequest, grid: WavelengthGrid) {
  return directSunlight(
    request.sun.spectrum,
    grid,
    {
      elevationDeg: Math.max(request.sun.elevationDeg, 0),
      pressureHpa: request.sun.atmosphere.pressureHpa,
      angstromBeta: request.sun.atmosphere.angstromBeta,
      angstromAlpha: request.sun.atmosphere.angstromAlpha,
    },
    request.sun.atmosphere.attenuate,
  );
}

export interface ProfileLimits {
  maxTermAngles: number;
}

export interface ProfileDeps {
  kernels: KernelService;
  limits: ProfileLimits;
  signal?: AbortSignal;
  /** Told of the work as it is done; it must have the PROFILE_STAGES. */
  progress?: ProgressMeter;
  /** Keep each kernel task's rows in the second tier at once (background jobs: a retry resumes from them). */
  saveEachTask?: boolean;
}

/** Numerical resolution beyond the request, for convergence studies; the defaults are what the service uses. */
export interface ProfileResolution {
  nodesPerDecade?: number;
  maxInternalStepDeg?: number;
  thinning?: readonly ThinningLevel[];
  /**
   * auto's Mie budget (AUTO_MIE_BUDGET_TERM_ANGLES): answers made of several profiles (size maps, lookup textures)
   * share it among their rows; bench/auto-presets.ts measures the error at other budgets.
   */
  autoMieBudgetTermAngles?: number;
  /** auto's AUTO_MAX_AIRY_SHARE; answers whose rows share the budget set 1, or the share rule multiplies their cost. */
  autoMaxAiryShare?: number;
  /**
   * Equilibrium drops blended from shape nodes this far apart in deformation (ShapedRowSpec.deformationStep); absent:
   * DEFAULT_DEFORMATION_STEP (drop-shape-plan.ts), 0: each radius its own shape (the reference benchmarks measure the
   * nodes against: bench/aligned-rows.ts, bench/shape-nodes.ts).
   */
  deformationStep?: number;
  /** Benchmarks only: the canting mean by rotation's grid (ShapedRowSpec.rotationGrid), to measure its sampling noise (bench/rotation-noise.ts). */
  rotationGrid?: ShapedRowSpec["rotationGrid"];
}

/**
 * Mie term-angles "auto" may spend on the radius density: ~1.7 s of this machine's two cores at the measured
 * ~1.5e9 term-angles/s (BENCHMARKS.md, P3 with 2 workers), so that a cold fog profile stays interactive.
 */
export const AUTO_DENSITY_BUDGET_TERM_ANGLES = 2.5e9;

/** Lorenz–Mie sizes per decade: a convergence study's own node density (one size per node), the request's own, or "auto". */
function radiusDensityFor(request: ProfileRequest, resolution: ProfileResolution, auto: Parameters<typeof chooseRadiusDensity>[0]): DensityChoice {
  if (resolution.nodesPerDecade !== undefined) return { sizesPerDecade: resolution.nodesPerDecade as DensityChoice["sizesPerDecade"], rule: `fixed by the caller: ${resolution.nodesPerDecade} nodes per decade, one size each` };
  if (request.mieSizesPerDecade !== "auto") return { sizesPerDecade: request.mieSizesPerDecade, rule: `requested: ${request.mieSizesPerDecade} Lorenz–Mie sizes per decade` };
  return chooseRadiusDensity(auto);
}

/** Cost-aware auto (lib/bow/engine-choice.ts): exact Mie where it fits the budget, Airy only for drops beyond it. */
function chooseAutoFor(quadrature: RadiusQuadrature, wl: Float64Array, span: { first: number; last: number }, resolution: ProfileResolution): AutoChoice {
  const { radiiUm, weights } = quadrature;
  // Kernel tasks compute only the span's lattice points, so that is what the cost counts (one size per node).
  const nodeCost = Array.from(radiiUm, (r) => estimateMieTermAngles(Float64Array.of(r), wl, span.last - span.first + 1, () => "mie"));
  const crossSection = Array.from(radiiUm, (r, i) => weights[i] * r * r);
  return chooseAutoEngine(radiiUm, nodeCost, crossSection, resolution.autoMieBudgetTermAngles, resolution.autoMaxAiryShare);
}

/** What "auto" chooses for a request, without computing it (null for the other methods). */
export function autoChoiceFor(request: ProfileRequest, resolution: ProfileResolution = {}): AutoChoice | null {
  if (request.method !== "auto") return null;
  const wl = wavelengthsNm(makeWavelengthGrid(request.spectral.fromNm, request.spectral.toNm, request.spectral.stepNm));
  const h = kernelStepFor(request.angles.stepDeg, resolution.maxInternalStepDeg);
  const span = profileSpan({ fromDeg: request.angles.fromDeg, stepDeg: request.angles.stepDeg, count: angleCount(request.angles) }, request.sun.discDeg, h);
  const quadrature = latticeRadiusQuadrature(toDistribution(request.drops), { nodesPerDecade: resolution.nodesPerDecade, thinning: resolution.thinning });
  return chooseAutoFor(quadrature, wl, span, resolution);
}

/** Plans' pure results by key, the PLAN_MEMO_ENTRIES used last: a warm profile would otherwise integrate its size distribution again. */
const PLAN_MEMO_ENTRIES = 256;
const planMemo = new LRUCache<string, { value: unknown }>({ max: PLAN_MEMO_ENTRIES });
function remembered<T>(key: string, make: () => T): T {
  let kept = planMemo.get(key);
  if (!kept) planMemo.set(key, (kept = { value: make() }));
  return kept.value as T;
}

/** The drops' radius nodes and weights (read only: shared by every plan of the same drops). */
function quadratureFor(drops: ProfileRequest["drops"], distribution: ReturnType<typeof toDistribution>, resolution: ProfileResolution): RadiusQuadrature {
  const key = `quadrature|${JSON.stringify(drops)}|${resolution.nodesPerDecade}|${resolution.thinning}`;
  return remembered(key, () => latticeRadiusQuadrature(distribution, { nodesPerDecade: resolution.nodesPerDecade, thinning: resolution.thinning }));
}

/**
 * Everything about a profile that is known before any work: wavelengths, drops on their radius nodes, engines,
 * Lorenz–Mie averaging, shapes, the lattice span, the kernel request and the estimated cost. computeProfile runs it
 * first; answers made of several profiles (lookup textures, size maps) run it for each of their rows. Nothing here
 * depends on the sun's spectrum or elevation except the flattened drops' shape plan (sphere rows never do).
 */
export function planProfile(request: ProfileRequest, resolution: ProfileResolution = {}, layers: ProfileLayers = "combined") {
  const byOrder = layers === "by-order";
  const warnings: string[] = [];
  const grid = makeWavelengthGrid(request.spectral.fromNm, request.spectral.toNm, request.spectral.stepNm);
  const wl = wavelengthsNm(grid);
  const { media, source: waterSource } = dropMedia(request.water, wl);
  if (/extrapolated/i.test(waterSource)) warnings.push(`water index extrapolated: ${waterSource}`);

  const distribution = toDistribution(request.drops);
  const count = angleCount(request.angles);
  const angles = { fromDeg: request.angles.fromDeg, stepDeg: request.angles.stepDeg, count };
  const h = kernelStepFor(request.angles.stepDeg, resolution.maxInternalStepDeg);
  const span = profileSpan(angles, request.sun.discDeg, h);
  const quadrature = quadratureFor(request.drops, distribution, resolution);
  // By order the whole rows and each named order's rows cost alike: auto's budgets are shared among them, so that a
  // layered answer costs about what the combined one does (auto may then leave more drops to the Airy engine).
  const budgetShare = byOrder ? 1 / (1 + ORDER_LAYERS.length) : 1;
  const autoResolution = byOrder ? { ...resolution, autoMieBudgetTermAngles: (resolution.autoMieBudgetTermAngles ?? AUTO_MIE_BUDGET_TERM_ANGLES) * budgetShare } : resolution;
  const autoChoice = request.method === "auto" ? chooseAutoFor(quadrature, wl, span, autoResolution) : null;
  const engine = autoChoice ? autoEngine(autoChoice) : engineChooser(request.method);
  // Lorenz–Mie rows averaged over each node's radius cell at sizesPerDecade (cell-average.ts, radius-density.ts).
  const averagesAt = (sizesPerDecade: number) => {
    const samples = Math.round(sizesPerDecade / quadrature.nodesPerDecade);
    return Array.from(quadrature.radiiUm, (r, i): CellAverage | undefined => {
      const widthLn = quadrature.cellWidthsLn?.[i];
      return engine(r) === "mie" && samples > 1 && widthLn !== undefined ? { samples, widthLn } : undefined;
    });
  };
  // Kernel tasks compute only the span's lattice points (KernelRequest.within), so that is what cost estimates count.
  // Per density, counted once: the density choice and the plan's cost below both ask for the chosen one.
  const costByDensity = new Map<number, number>();
  const mieCostAt = (sizesPerDecade: number) => {
    let cost = costByDensity.get(sizesPerDecade);
    if (cost === undefined) {
      cost = estimateMieTermAngles(quadrature.radiiUm, wl, span.last - span.first + 1, engine, averagesAt(sizesPerDecade));
      costByDensity.set(sizesPerDecade, cost);
    }
    return cost;
  };
  const density = radiusDensityFor(request, resolution, {
    base: quadrature,
    engine,
    nAir: media[0].nAir,
    cost: mieCostAt,
    // A constant, not the server's limit: the result for a request (and its content hash) is the same on every
    // server, synchronous or as a job; the limit only decides whether it may run synchronously.
    budgetTermAngles: AUTO_DENSITY_BUDGET_TERM_ANGLES * budgetShare,
  });
  if (density.cappedFrom) {
    warnings.push(
      `the Mie ripple of these drops wants about ${density.cappedFrom} sizes per decade; auto used ${density.sizesPerDecade} to stay interactive, so colours may differ from converged ones where the bow is faint (fog, 10 µm: worst ΔE2000 2.4 with no averaging, 0.7 at 512): ask mieSizesPerDecade ${density.cappedFrom} (as a job, POST /v1/jobs, if it is too costly)`,
    );
  }
  const averages = averagesAt(density.sizesPerDecade);
  if (quadrature.cappedAtMaxRadius && quadrature.crossSectionFractionAboveCap > 1e-3) {
    warnings.push(
      `drops above ${quadrature.maxRadiusUm} µm radius (${(100 * quadrature.crossSectionFractionAboveCap).toFixed(1)} % of the cross-section) are left out: such drops break up in nature`,
    );
  }
  const shapePlan = planDropShapes(request, quadrature.radiiUm, resolution.deformationStep, resolution.rotationGrid);
  // The warnings about the sphere model are moot where flattened drops are modelled.
  if (shapePlan.flattened) {
    warnings.push(...shapePlan.warnings);
  } else if (request.drops.kind !== "monodisperse") {
    const flattened = remembered(`above|${JSON.stringify(request.drops)}`, () => fractionOfCrossSectionAbove(distribution, FLATTENED_FROM_RADIUS_UM));
    if (flattened > 0.5) {
      warnings.push(
        `${(100 * flattened).toFixed(0)} % of the drops' cross-section is in drops above 1 mm radius, which flatten as they fall (Beard & Chuang 1987); the sphere model overstates their bow`,
      );
    }
  } else if (request.drops.radiusUm > FLATTENED_FROM_RADIUS_UM) {
    warnings.push("drops above 1 mm radius flatten as they fall (Beard & Chuang 1987); the sphere model overstates their bow");
  }

  const blocks = blocksOf(span);
  // Flattened drops' rows are counted in Mie term-angles' worth of work (drop-shape-plan.ts).
  // By order, each named order's rows cost about what the whole rows do (Debye coefficients, the same amplitude sums).
  const profilesToSum = byOrder ? 1 + ORDER_LAYERS.length : 1;
  const cost = (mieCostAt(density.sizesPerDecade) + shapedCostTermAngles(shapePlan, grid.count, span.last - span.first + 1)) * profilesToSum;
  const engines = Array.from(quadrature.radiiUm, engine);
  const kernelRequest: KernelRequest = { h, media, radiiUm: quadrature.radiiUm, engines, averages, shapes: shapePlan.shapes, blocks, within: { first: span.first, last: span.last } };
  return { request, warnings, grid, wl, media, waterSource, distribution, count, angles, h, span, quadrature, autoChoice, engine, density, averages, shapePlan, blocks, cost, kernelRequest, byOrder, profilesToSum };
}

export type ProfilePlan = ReturnType<typeof planProfile>;

/** The "too-costly" ClientError where a plan's kernels exceed the synchronous limit. */
export function refuseTooCostly(plan: ProfilePlan, limits: ProfileLimits): void {
  const { cost, density, quadrature } = plan;
  if (cost > limits.maxTermAngles) {
    throw new ClientError(
      "too-costly",
      `this profile needs about ${cost.toExponential(2)} Mie term-angles; the synchronous limit is ${limits.maxTermAngles.toExponential(2)}. ` +
        `Submit it as a background job (POST /v1/jobs), or use method "auto", fewer angles or wavelengths, or smaller drops` +
        (density.sizesPerDecade > quadrature.nodesPerDecade ? `, or fewer Lorenz–Mie sizes (mieSizesPerDecade, now ${density.sizesPerDecade})` : ""),
      { cost, limit: limits.maxTermAngles, jobs: "/v1/jobs" },
    );
  }
}

/** What the spectral pass shares: the disc's kernels per wavelength, the output samples wanted (all by default). */
export interface SpectralPassOptions {
  disc?: (wavelengthIndex: number) => DiscKernel;
  samples?: Int32Array;
  /** Told of each wavelength done, with the cost of the pass so far in ns. */
  onWavelength?: (doneNs: number) => void;
  /** Sums over drops kept by the kernel service (KernelService.populationSums): each one made is kept there. */
  sums?: PopulationSums;
}

/**
 * The profile per unit sunlight and path (lattice-profile.ts, latticeUnitProfilePass), one wavelength per turn of
 * the event loop: the sum over drops and the sun's disc, the bulk of a warm profile's time.
 */
export async function unitSpectralProfile(plan: ProfilePlan, rows: KernelRows, options: SpectralPassOptions = {}): Promise<SpectralProfile> {
  return spectralPassAsRowsArrive(plan, options).finish(rows);
}

/**
 * unitSpectralProfile fed wavelength by wavelength while the kernel rows are computed (onWavelength as
 * KernelWatch.onWavelength): on a cold request the main thread sums each wavelength as its task ends, in time the
 * worker threads compute anyway, instead of all of them after the last task. finish sums the wavelengths not fed (all
 * of them on a warm request) and gives the same profile to the last bit: each wavelength's sum reads its own rows alone.
 */
export function spectralPassAsRowsArrive(plan: ProfilePlan, options: SpectralPassOptions = {}) {
  const { span, kernelRequest, quadrature, request, grid } = plan;
  const pass = latticeUnitProfilePass({
    angles: plan.angles,
    grid,
    span,
    disc: options.disc ?? discKernels(grid, request.sun.discDeg, span.h, request.sun.limbDarkening),
    samples: options.samples,
  });
  const sums = options.sums;
  const sum = (l: number, row: (i: number, block: number) => Float64Array) => (out: Float64Array) => {
    accumulateBlocks(span, kernelRequest.blocks, quadrature.weights, row, out);
    sums?.set(l, out.slice());
  };
  return {
    onWavelength: (l: number, row: (i: number, block: number) => Float64Array) => pass.add(l, sum(l, row)),
    /**
     * The profile from kept sums over drops when every wavelength has one (no rows read; found() is told first), else
     * undefined (nothing done).
     */
    fromSums(found?: () => void): SpectralProfile | undefined {
      const kept = sums ? Array.from({ length: grid.count }, (_, l) => sums.get(l)) : [];
      if (!sums || kept.some((k) => k === undefined)) return undefined;
      found?.();
      const perWavelengthNs = options.onWavelength ? laterWorkNs(request, plan).spectralNsPerWavelength : 0;
      kept.forEach((k, l) => {
        pass.add(l, (out) => out.set(k!));
        options.onWavelength?.((l + 1) * perWavelengthNs);
      });
      return { ...pass.result(), mieTermAngles: 0 };
    },
    async finish(rows: KernelRows): Promise<SpectralProfile> {
      const perWavelengthNs = options.onWavelength ? laterWorkNs(request, plan).spectralNsPerWavelength : 0;
      for (let l = 0; l < grid.count; l++) {
        const fed = pass.has(l);
        if (!fed) pass.add(l, sum(l, (i, b) => rows.get(l, i, b)));
        options.onWavelength?.((l + 1) * perWavelengthNs);
        if (!fed) await new Promise<void>((resolve) => setImmediate(resolve));
      }
      return { ...pass.result(), mieTermAngles: rows.stats.mieTermAngles };
    },
  };
}

/** The sunlight on the rain for a plan under `sun` (the plan's own, or another elevation's), and what follows from it alone. */
export function sunLightFor(plan: ProfilePlan, sun: ProfileRequest["sun"] = plan.request.sun) {
  const request = { ...plan.request, sun };
  const sunlight = sunlightFor(request, plan.grid);
  const sunWhite = spectrumToXyz(sunlight.irradiance, request.observer);
  const eye = request.output.vision === "eye" ? sceneEyeAdaptation(sunlight.irradiance, sun.elevationDeg, request.output.adaptingLuminanceCdPerM2) : undefined;
  const noSunlight = sunWhite.Y > 0 ? undefined : "no direct sunlight reaches the drops in the visible (sun on the horizon through this atmosphere): the bow is black";
  return { sunlight, sunWhite, eye, noSunlight, elevationDeg: sun.elevationDeg };
}

export type SunLight = ReturnType<typeof sunLightFor>;

function colourOptions(plan: ProfilePlan, light: SunLight): ColourOptions {
  const { request } = plan;
  return {
    observer: request.observer,
    space: request.output.space,
    gamut: request.output.gamut,
    white: request.output.white,
    normalise: request.output.normalise,
    polariserDeg: request.polariserDeg,
    sunWhite: light.sunWhite,
    eye: light.eye,
  };
}

/** A profile's spectral radiance and colour: the unit profile lit by `light`. */
export function sunlitColour(plan: ProfilePlan, unit: SpectralProfile, light: SunLight) {
  const spectral = sunlitProfile(unit, light.sunlight.irradiance.values, plan.request.pathLengthM);
  return { spectral, colour: colourProfile(spectral, plan.grid, colourOptions(plan, light)) };
}

/**
 * The colour sums of many unit profiles under one sun, as lookup textures take them (physical values in a linear
 * space): per sun the weights K_m·Δλ·E(λ)·s·x̄(λ)… once, per row the polarised unit radiance once, then one dot
 * product per sample and sun. The order of operations differs from sunlitColour's by rounding only (≈ 1e-16).
 */
export function unitRadianceFor(plan: ProfilePlan, unit: SpectralProfile): Float64Array {
  const { cos2, sin2 } = polariserWeights(plan.request.polariserDeg);
  return polarisedUnitRadiance(unit, cos2, sin2);
}

export function sunColourWeights(plan: ProfilePlan, light: SunLight): Float64Array[] {
  return sunlitXyzWeights(plan.grid, plan.request.observer, light.sunlight.irradiance.values, plan.request.pathLengthM);
}

/** Absolute XYZ (cd/m²) of a row's polarised unit radiance under one sun's colour weights. */
export function sunlitXyz(unitRadiance: Float64Array, weights: readonly Float64Array[]): Float64Array {
  return weightedXyz(unitRadiance, weights);
}

/** The output space's values of XYZ from sunlitXyz (any number of rows at once: the white's adaptation is made once). */
export function sunlitLinearRgb(plan: ProfilePlan, xyzAbsolute: Float64Array, light: SunLight): Float64Array {
  return linearRgbOfXyz(xyzAbsolute, colourOptions(plan, light));
}

/** A profile's warnings: the plan's, the sunlight's, the engines', then the sun's elevation. */
export function profileWarnings(plan: ProfilePlan, sun: SunLight): string[] {
  const { request, quadrature } = plan;
  const warnings = [...plan.warnings];
  if (sun.noSunlight) warnings.push(sun.noSunlight);
  if (request.method === "airy" && quadrature.radiiUm[0] < AUTO_AIRY_FROM_RADIUS_UM) {
    warnings.push(`Airy theory used for drops below ${AUTO_AIRY_FROM_RADIUS_UM} µm, outside its measured validity; use "auto" or "mie"`);
  }
  if (request.method === "geometric") {
    warnings.push("ray optics has no supernumeraries and no diffraction; bows are sharper than in nature");
  }
  if (sun.elevationDeg > 42) {
    warnings.push("with the sun above about 42° the primary bow lies below the horizon for an observer on flat ground");
  }
  return warnings;
}

/** The rows of a profile made from kept sums over drops: none read (KernelService.populationSums). */
const NO_ROWS: KernelRows = {
  get: () => {
    throw new Error("no kernel rows: the profile was made from kept sums over drops");
  },
  stats: { memoryHits: 0, diskHits: 0, computed: 0, mieTermAngles: 0 },
};

/** plan: planProfile(request, resolution, layers) when the caller has it already (rows weighed for their progress). */
export async function computeProfile(
  request: ProfileRequest,
  deps: ProfileDeps,
  resolution: ProfileResolution = {},
  layers: ProfileLayers = "combined",
  plan: ProfilePlan = planProfile(request, resolution, layers),
): Promise<ProfileResult> {
  const started = performance.now();
  refuseTooCostly(plan, deps.limits);
  const { grid, quadrature, span, engine, autoChoice, density, shapePlan, byOrder, profilesToSum } = plan;
  const progress = deps.progress;
  // By order the sum over drops and the colour run once for the whole and once per named order.
  const later = progress ? laterWorkNs(request, plan) : undefined;
  if (later) {
    progress?.plan("spectral", profilesToSum * later.spectralNs);
    progress?.plan("colour", profilesToSum * later.colourNs);
  }
  const kernelStarted = performance.now();
  // The whole rows and, by order, each named order's rows (kept apart in the cache: orderVariant), all at once.
  const requestedOrders: (number | undefined)[] = [undefined, ...(byOrder ? ORDER_LAYERS.map((layer) => layer.order) : [])];
  const tallies = requestedOrders.map(() => ({ doneNs: 0, totalNs: 0 }));
  // Each requested order's spectral pass, fed as its rows arrive; its progress counts once the rows are all in (a
  // later stage advancing would mark the kernels done). By order the named orders follow the whole in the progress.
  // The whole drops' sums over drops are kept by content (KernelService.populationSums): where every wavelength's is
  // kept, no row is read. The named orders' are not kept (layered answers are rare and their own cache entry).
  const sums = byOrder ? undefined : deps.kernels.populationSums(plan.kernelRequest, quadrature.weights);
  const passes = requestedOrders.map((_, t) =>
    spectralPassAsRowsArrive(plan, { onWavelength: progress ? (ns) => progress.advance("spectral", t * (later?.spectralNs ?? 0) + ns) : undefined, sums: t === 0 ? sums : undefined }),
  );
  // Kept sums stand for the rows they were made from: the kernels count as found, at the rows' estimated cost.
  const reused = passes[0].fromSums(() => {
    progress?.plan("kernels", kernelWorkNs(plan, deps.kernels.parallelism));
    progress?.complete("kernels", { found: true });
  });
  const [rows, ...orderRows] = reused ? [NO_ROWS] : await Promise.all(
    requestedOrders.map((order, t) =>
      deps.kernels.rows(order === undefined ? plan.kernelRequest : { ...plan.kernelRequest, order }, deps.signal, {
        saveEachTask: deps.saveEachTask,
        onWavelength: passes[t].onWavelength,
        onRows: progress
          ? (doneNs, totalNs, found) => {
              tallies[t] = { doneNs, totalNs };
              progress.plan("kernels", tallies.reduce((sum, x) => sum + x.totalNs, 0));
              progress.advance("kernels", tallies.reduce((sum, x) => sum + x.doneNs, 0), { found });
            }
          : undefined,
      }),
    ),
  );
  const kernelMs = performance.now() - kernelStarted;
  const unit = reused ?? (await passes[0].finish(rows));
  const light = sunLightFor(plan);
  const { spectral, colour } = sunlitColour(plan, unit, light);
  // Each named order through the same sum, sunlight and colour (its unit profile after the whole one's in the progress).
  const orders: OrderProfile[] = [];
  for (const [k, layer] of ORDER_LAYERS.entries()) {
    if (!byOrder) break;
    const orderUnit = await passes[k + 1].finish(orderRows[k]);
    const lit = sunlitColour(plan, orderUnit, light);
    orders.push({ name: layer.name, order: layer.order, spectral: lit.spectral, colour: lit.colour });
  }
  const stats = sumStats([rows, ...orderRows].map((r) => r.stats));
  const { sunlight: sun, sunWhite, eye } = light;
  const bows = shapePlan.flattened
    ? findBowsByDispersion({ anglesDeg: spectral.anglesDeg, wavelengthsNm: plan.wl, radiance: spectral.perpendicular.map((v, k) => v + spectral.parallel[k]) }, colour.luminance)
    : findBows(spectral.anglesDeg, colour.luminance);
  progress?.complete("colour");

  const warnings = profileWarnings(plan, light);
  if (shapePlan.flattened) warnings.push(...flattenedBowNotes(bows, request.angles.fromDeg, request.angles.toDeg));
  const engineRanges = summariseEngines(quadrature.radiiUm, engine);

  const meta: ProfileMeta = {
    method: { requested: request.method, engines: engineRanges, ...(autoChoice ? { rule: autoChoice.rule } : {}) },
    shape: shapePlan.meta,
    units: {
      anglesDeg: "degrees from the antisolar point",
      luminance: request.output.normalise === "peak" ? "relative: the brightest sample is 1" : "cd/m²",
      xyz: request.output.normalise === "peak" ? "relative: the brightest sample has Y = 1" : "cd/m² (Y is luminance)",
      spectralRadiance: "W m⁻² sr⁻¹ nm⁻¹",
      rgb: rgbUnits(request),
    },
    normalisation: request.output.normalise,
    peakLuminanceCdPerM2: Math.max(...colour.luminanceCdPerM2),
    wavelengths: { fromNm: grid.fromNm, toNm: grid.toNm, stepNm: grid.stepNm, count: grid.count, medium: "vacuum" },
    radii: {
      nodes: quadrature.radiiUm.length,
      fromUm: quadrature.lowerUm,
      toUm: quadrature.upperUm,
      nodesPerDecade: quadrature.nodesPerDecade,
      mieSizesPerDecade: density.sizesPerDecade,
      rule: density.rule,
    },
    sun: { scale: sun.scaleNote, attenuated: sun.attenuated },
    water: plan.waterSource,
    colour: { whiteAdaptation: colour.whiteAdaptation, spaceAdaptation: colour.spaceAdaptation },
    vision: visionMeta(eye),
    mieTermAngles: stats.mieTermAngles,
    computeMs: Math.round((performance.now() - started) * 10) / 10,
    kernel: {
      angleStepDeg: span.h,
      rows: stats.memoryHits + stats.diskHits + stats.computed,
      memoryHits: stats.memoryHits,
      diskHits: stats.diskHits,
      computed: stats.computed,
      sumsKept: reused ? grid.count : 0,
      ms: Math.round(kernelMs * 10) / 10,
    },
    cache: stats.computed === 0 ? "hit" : "miss",
    hash: requestHash(request),
    sources: profileSources(request),
    warnings,
  };
  return { request, sunWhite, grid, quadrature, spectral, colour, bows, meta, ...(byOrder ? { orders } : {}) };
}

/** The kernel statistics of several row requests together (the whole rows and each order's). */
function sumStats(all: KernelStats[]): KernelStats {
  return all.reduce((sum, s) => ({
    memoryHits: sum.memoryHits + s.memoryHits,
    diskHits: sum.diskHits + s.diskHits,
    computed: sum.computed + s.computed,
    mieTermAngles: sum.mieTermAngles + s.mieTermAngles,
  }));
}

function rgbUnits(request: ProfileRequest): string {
  const encoded = ["srgb", "display-p3", "rec2020"].includes(request.output.space);
  if (encoded) return `${request.output.space}, encoded (transfer function applied), 1 = the peak's luminance`;
  return request.output.normalise === "peak" ? `${request.output.space}, linear, relative to the peak` : `${request.output.space}, linear, cd/m²`;
}

function summariseEngines(radiiUm: Float64Array, engine: (r: number) => DropEngine): EngineRange[] {
  const out: EngineRange[] = [];
  for (const r of radiiUm) {
    const e = engine(r);
    const last = out[out.length - 1];
    if (last && last.engine === e) {
      last.toUm = r;
      last.nodes++;
    } else out.push({ engine: e, fromUm: r, toUm: r, nodes: 1 });
  }
  for (const range of out) range.estimatedError = estimatedEngineError(range.engine, range.fromUm);
  return out;
}

export function profileSources(request: ProfileRequest): string[] {
  const s = [
    "IAPWS R9-97 (Harvey, Gallagher & Levelt Sengers 1998) with Kell 1975 density; Ciddor 1996 air index",
    "Lorenz–Mie theory (Bohren & Huffman 1983; Wiscombe 1980)",
    "Airy 1838 / van de Hulst 1957 §13.2 rainbow theory; ray optics with Fresnel coefficients (van de Hulst 1957 ch. 12)",
    `CIE 015:2018 colorimetry with the ${request.observer === "cie1931-2" ? "CIE 1931 2°" : "CIE 1964 10°"} observer (ISO/CIE 11664-1:2019)`,
    "Neckel & Labs 1994 limb darkening",
  ];
  if (request.water.salinityPsu > 0) s.push("Quan & Fry 1995 sea-water index");
  if (request.drops.kind === "marshall-palmer") s.push("Marshall & Palmer 1948 drop sizes");
  if (request.drops.kind === "gamma") s.push("Ulbrich 1983 gamma drop sizes");
  if (request.sun.spectrum.kind === "astm-g173") s.push("ASTM G173-03 reference spectra");
  if (request.sun.spectrum.kind === "cie-d65" || request.sun.spectrum.kind === "cie-daylight") s.push("CIE daylight (CIE 015:2018)");
  s.push("Kasten & Young 1989 air mass; Bucholtz 1995 Rayleigh depth; Ångström 1929 aerosol");
  return s;
}
