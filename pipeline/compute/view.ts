// Camera views and sky maps of a bow layer: a profile computed over the ψ range the image needs, turned into
// linear colours per profile sample, spread over the pixels by lib/view, and written as EXR, Radiance HDR or PNG.

import sharp from "sharp";
import { profileDefaults, type ProfileRequest } from "../../schemas/profile.js";
import type { ImageQuery, SkyRequest, ViewRequest, ViewScenario } from "../../schemas/view.js";
import { computeProfile, planProfile, type ProfileLayers, type ProfileLimits, type ProfileResult } from "./profile.js";
import type { SpectralProfile } from "../../lib/bow/lattice-profile.js";
import { MAX_LAYERED_PIXELS, orderLayersManifest, withOrderLayers } from "./order-layers.js";
import type { KernelService } from "../kernels/kernel-service.js";
import type { ProgressMeter } from "../progress/progress-meter.js";
import { rowsProgress } from "../progress/rows-progress.js";
import { ClientError } from "../requests/client-error.js";
import { luminanceReciprocal, spectraToXyz, type Xyz } from "../../lib/colour/tristimulus.js";
import { renderXyz } from "../../lib/colour/render.js";
import { encodeLinear, outputSpace, type OutputSpaceId } from "../../lib/colour/output-spaces.js";
import { LUMINOUS_EFFICACY_LM_PER_W } from "../../lib/bow/colour-profile.js";
import { type Camera, cameraBasis, cameraRayField, centralPixelDeg, fieldOfViewDeg, focalPxFromFov, focalPxFromLens } from "../../lib/view/camera.js";
import { skyRayField } from "../../lib/view/sky-map.js";
import type { RayField } from "../../lib/view/ray-field.js";
import { type Vec3, azimuthElevationOf, directionFromAzimuthElevation } from "../../lib/view/vectors.js";
import { angleFromAntisolarDeg, angleRangeDeg, renderLayer, type Layer, type ProfileColours } from "../../lib/view/layer.js";
import { arcFrame, arcPositionInFrame } from "../../lib/view/arc-position.js";
import { isFlattened } from "../../schemas/drop-shape.js";
import type { ArcSlices } from "../../lib/view/arc-slices.js";
import { arcNodesDeg, ARC_NODE_STEP_DEG, ARC_INTERPOLATION, ARC_TOLERANCE } from "./arc-nodes.js";
import { asksRotation, withSiblingArcs } from "./sibling-arcs.js";
import { curtainTransmittance } from "../../lib/bow/extinction.js";
import { spacePrimaries } from "../../lib/colour/primaries.js";
import { contentHash } from "../requests/content-hash.js";
import { ditheredCode8 } from "../../lib/view/dither.js";
import { encodeExr, type ExrChromaticities } from "../encoders/exr.js";
import { encodeRadianceHdr } from "../encoders/radiance-hdr.js";
import { withSpaceColourChunks } from "../encoders/png-strip.js";
import type { CameraDescription, MapDescription, OverlayManifest } from "../../schemas/responses/overlay-response.js";
import { COST_NS } from "../progress/work-costs.js";
import { roughWaterSurfaceFor, waterAngleRangeDeg, waterSurfaceFor, type WaterSurface } from "../../lib/view/water-reflection.js";
import { dropMedium } from "../../lib/water/drop-medium.js";
import { CURTAIN_WAVELENGTH_NM } from "../../lib/bow/extinction.js";

/** The window that holds both bows (primary ≈ 42°, secondary ≈ 51°: Descartes angles, docs/checks.md); "peak" scales to its brightest sample. */
const BOW_WINDOW_DEG = { fromDeg: 30, toDeg: 60 } as const;
/** Coarsest profile step: the sun's disc (0.533°) smears anything finer; finer still where a pixel is smaller. */
const MAX_PROFILE_STEP_DEG = 0.1;
/**
 * Finest profile step for flattened drops, however small the pixels: it keeps their rows on the kernel lattice's
 * coarsest step (0.05°, lib/bow/kernel-grid.ts) instead of 0.01° or 0.002°, whose rows cost 5× or 25× as much.
 * Measured (BENCHMARKS.md view-step, bench/view-step.ts): against the profile at a 40° lens's pixel step (0.033°,
 * lattice 0.01°), interpolated linearly to its samples as pixels are drawn, worst CIEDE2000 0.40 for upright 1 mm
 * equilibrium drops at the top of the bow (no canting: the sharpest flattened bows) and 0.17 for a Marshall–Palmer
 * 25 mm/h shower of spheroids, at 0.17 and 0.15 of the cold time. Spheres keep the pixel's step: the Lorenz–Mie ripple
 * of one drop size (period 180°/N, 0.06° for 0.25 mm drops) survives the disc's smoothing enough to cost 1.3 there.
 */
export const FLATTENED_MIN_PROFILE_STEP_DEG = 0.05;
/** The profile endpoint's limit on samples per request (schemas/profile.ts). */
const MAX_PROFILE_SAMPLES = 4001;
/** Above this optical depth single scattering overstates the bow by more than e^(−1/2) ≈ 40 % (Beer–Lambert). */
const SINGLE_SCATTERING_TAU = 1;
/** Camera used when neither horizontalFovDeg nor focalLengthMm is given. */
const DEFAULT_HORIZONTAL_FOV_DEG = 90;

export interface ViewDeps {
  kernels: KernelService;
  limits: ProfileLimits;
  signal?: AbortSignal;
  /** As for profiles (ProfileDeps): told of the profile's work; must have the PROFILE_STAGES. */
  progress?: ProgressMeter;
  saveEachTask?: boolean;
}

type Output = ViewRequest["output"];
type LinearSpace = Output["space"];

interface Scene {
  endpoint: "view" | "sky";
  rays: RayField;
  sunDirection: Vec3;
  antisolar: Vec3;
  ground: boolean;
  layer: "premultiplied" | "additive";
  maxAngleDeg: number;
  /** Angular size of a pixel where it is smallest on the sky, degrees. */
  pixelDeg: number;
  polariserAxis?: Vec3;
  /** A polariser at a fixed angle to the bow's tangent: its cos² (Malus's law), the same at every pixel. */
  polariserTangentCos2?: number;
  scenario: ViewScenario;
  output: Output;
  sunPosition: { azimuthDeg: number; elevationDeg: number };
  description: CameraDescription | MapDescription;
  normalisedRequest: unknown;
  /** Calm water below the horizon, or none. */
  water?: WaterSurface;
  /** Flattened drops (scenario.drops.shape not a sphere): the bow changes along its arc. */
  flattened: boolean;
}

/**
 * The water surface of a scene that asked for one: its index (the scenario's water at 555 nm, the peak of V(λ),
 * CIE 015:2018, as for the curtain) and the reflectances of the sunlight.
 */
/** The sun's direction, the antisolar point opposite it, the water surface when one was asked for, and whether the drops are flattened. */
function lightOf(body: ViewRequest | SkyRequest, sunDirection: Vec3): Pick<Scene, "sunDirection" | "antisolar" | "water" | "flattened"> {
  const antisolar: Vec3 = [-sunDirection[0], -sunDirection[1], -sunDirection[2]];
  return {
    sunDirection,
    antisolar,
    water: waterOf(body.waterSurface, body.scenario, sunDirection, antisolar),
    flattened: isFlattened(body.scenario.drops.shape),
  };
}

function waterOf(
  kind: { kind: "calm" } | { kind: "rough"; windSpeedMs: number } | undefined,
  scenario: ViewScenario,
  sunDirection: Vec3,
  antisolar: Vec3,
): WaterSurface | undefined {
  if (!kind) return undefined;
  const n = dropMedium(scenario.water, CURTAIN_WAVELENGTH_NM).mRe;
  return kind.kind === "rough" ? roughWaterSurfaceFor(sunDirection, antisolar, n, kind.windSpeedMs) : waterSurfaceFor(sunDirection, antisolar, n);
}

export function overlayHash(endpoint: string, request: unknown): string {
  return contentHash(request, endpoint);
}

function worldFrameNote(): string {
  return "world frame: x east, y north, z up; azimuth clockwise from north (east = 90°), elevation up from the horizon";
}

export function cameraOf(body: ViewRequest): Camera {
  const sun = body.sun;
  const c = body.camera;
  const focalPx =
    c.focalLengthMm !== undefined
      ? focalPxFromLens(c.focalLengthMm, c.sensorWidthMm, c.widthPx)
      : focalPxFromFov(c.projection, c.widthPx, c.horizontalFovDeg ?? DEFAULT_HORIZONTAL_FOV_DEG);
  return {
    projection: c.projection,
    widthPx: c.widthPx,
    heightPx: c.heightPx,
    focalPx,
    yawDeg: c.yawDeg ?? (((sun.azimuthDeg + 180) % 360) + 360) % 360,
    pitchDeg: c.pitchDeg,
    rollDeg: c.rollDeg,
  };
}

function viewScene(body: ViewRequest): Scene {
  const camera = cameraOf(body);
  if (camera.projection === "rectilinear" && fieldOfViewDeg("rectilinear", camera.focalPx, camera.widthPx) >= 179) {
    throw new ClientError("invalid-request", "body field 'camera.focalLengthMm' gives a rectilinear view 179° wide or more; use a longer lens or projection fisheye", {
      field: "camera.focalLengthMm",
    });
  }
  const basis = cameraBasis(camera);
  const sunDirection = directionFromAzimuthElevation(body.sun.azimuthDeg, body.sun.elevationDeg);
  let polariserAxis: Vec3 | undefined;
  if (body.polariserDeg !== undefined) {
    const b = (body.polariserDeg * Math.PI) / 180;
    polariserAxis = [0, 1, 2].map((k) => Math.cos(b) * basis.right[k] + Math.sin(b) * basis.up[k]) as Vec3;
  }
  const description: CameraDescription = {
    kind: "camera",
    projection: camera.projection,
    mapping:
      camera.projection === "rectilinear"
        ? "rectilinear pinhole: r = f·tan θ (θ from the optical axis, r in pixels from the image centre)"
        : "equidistant fisheye: r = f·θ (θ in radians from the optical axis, r in pixels from the image centre)",
    widthPx: camera.widthPx,
    heightPx: camera.heightPx,
    focalPx: camera.focalPx,
    horizontalFovDeg: fieldOfViewDeg(camera.projection, camera.focalPx, camera.widthPx),
    verticalFovDeg: fieldOfViewDeg(camera.projection, camera.focalPx, camera.heightPx),
    principalPointPx: [camera.widthPx / 2, camera.heightPx / 2],
    pixelCentres: "pixel (i, j) has its centre at (i + 0.5, j + 0.5); j grows downwards",
    yawDeg: camera.yawDeg,
    pitchDeg: camera.pitchDeg,
    rollDeg: camera.rollDeg,
    rollConvention: "positive roll turns the camera clockwise as the photographer sees it",
    axes: { forward: basis.forward, right: basis.right, up: basis.up },
    polariser:
      body.polariserDeg === undefined
        ? null
        : {
            axisDeg: body.polariserDeg,
            convention: "transmission axis at this angle anticlockwise from the image's horizontal; per pixel the field along the bow's tangent passes with cos²α, the radial field with sin²α (Malus)",
          },
  };
  return {
    endpoint: "view",
    rays: cameraRayField(camera),
    ...lightOf(body, sunDirection),
    ground: body.ground,
    layer: body.layer,
    maxAngleDeg: body.maxAngleDeg,
    pixelDeg: camera.projection === "rectilinear" ? centralPixelDeg(camera.focalPx) : 180 / Math.PI / camera.focalPx,
    polariserAxis,
    scenario: body.scenario,
    output: body.output,
    sunPosition: body.sun,
    description,
    normalisedRequest: { ...body, camera: { ...body.camera, yawDeg: camera.yawDeg } },
  };
}

function skyScene(body: SkyRequest): Scene {
  const sunDirection = directionFromAzimuthElevation(body.sun.azimuthDeg, body.sun.elevationDeg);
  return {
    endpoint: "sky",
    rays: skyRayField(body.widthPx, body.heightPx),
    ...lightOf(body, sunDirection),
    ground: body.ground,
    layer: body.layer,
    maxAngleDeg: body.maxAngleDeg,
    // Rows near the poles are narrower in azimuth, but a row is always 180°/height tall.
    pixelDeg: 180 / body.heightPx,
    polariserTangentCos2: body.polariserToTangentDeg === undefined ? undefined : Math.cos((body.polariserToTangentDeg * Math.PI) / 180) ** 2,
    scenario: body.scenario,
    output: body.output,
    sunPosition: body.sun,
    description: {
      kind: "equirectangular",
      widthPx: body.widthPx,
      heightPx: body.heightPx,
      mapping:
        "longitude = azimuth, latitude = elevation, both linear: column centre u = (x + 0.5)/width has azimuth 360°·u − 180° " +
        "(north in the middle column, east at ¾ width, south at both edges; east is right of north, as seen from inside the sphere); " +
        "row centre v = (y + 0.5)/height has elevation 90° − 180°·v (zenith at the top)",
    },
    normalisedRequest: body,
  };
}

/** The validated scenario with the view's choices: the profile request the image is made from. */
function profileRequestFor(scene: Scene, angles: { fromDeg: number; toDeg: number; stepDeg: number }, arcPositionDeg?: number): ProfileRequest {
  return {
    ...profileDefaults,
    ...scene.scenario,
    sun: { ...scene.scenario.sun, elevationDeg: scene.sunPosition.elevationDeg },
    angles,
    ...(arcPositionDeg === undefined ? {} : { arcPositionDeg }),
    output: { space: "xyz-d65", gamut: "clip", normalise: "physical", white: "absolute", vision: scene.output.vision, adaptingLuminanceCdPerM2: scene.output.adaptingLuminanceCdPerM2 },
  };
}

interface SeenRange {
  minDeg: number;
  maxDeg: number;
}

function profileAngles(scene: Scene): { fromDeg: number; toDeg: number; stepDeg: number; seen: SeenRange | null; arcSeen: SeenRange | null } {
  // Arc positions matter only for flattened drops (no water with them: schemas/view.ts).
  const arc = { minDeg: Infinity, maxDeg: -Infinity };
  const frame = arcFrame(scene.antisolar);
  const onSeen = scene.flattened
    ? (d: Float64Array) => {
        const a = arcPositionInFrame(d, frame);
        arc.minDeg = Math.min(arc.minDeg, a);
        arc.maxDeg = Math.max(arc.maxDeg, a);
      }
    : undefined;
  // With water the lower half shows the water, not the ground; the reflection bow and the mirrored bows add angles.
  let seen = angleRangeDeg(scene.rays, scene.antisolar, scene.ground || scene.water !== undefined, scene.maxAngleDeg, onSeen);
  if (scene.water) {
    let fromWater = waterAngleRangeDeg(scene.rays, scene.antisolar, scene.water, scene.maxAngleDeg, angleFromAntisolarDeg);
    const rough = scene.water.rough;
    if (fromWater && rough) {
      // Each glitter group's bow centre lies within `spread` of the calm one, so its ψ lies within spread of the
      // calm ψ (triangle inequality on the sphere).
      const calm = scene.water.reflectedAntisolar;
      const spread = Math.max(...rough.surfaces.map((g) => angleFromAntisolarDeg(g.reflectedAntisolar, calm)));
      fromWater = { minDeg: Math.max(0, fromWater.minDeg - spread), maxDeg: Math.min(180, fromWater.maxDeg + spread) };
    }
    if (fromWater) seen = seen ? { minDeg: Math.min(seen.minDeg, fromWater.minDeg), maxDeg: Math.max(seen.maxDeg, fromWater.maxDeg) } : fromWater;
  }
  let lo: number = BOW_WINDOW_DEG.fromDeg;
  let hi: number = BOW_WINDOW_DEG.toDeg;
  if (seen) {
    lo = Math.min(lo, seen.minDeg);
    hi = Math.max(hi, seen.maxDeg);
  }
  let step = Math.min(MAX_PROFILE_STEP_DEG, scene.pixelDeg);
  if (scene.flattened) step = Math.max(step, FLATTENED_MIN_PROFILE_STEP_DEG);
  const pad = step;
  lo = Math.max(0, lo - pad);
  hi = Math.min(180, hi + pad);
  step = Math.max(step, (hi - lo) / (MAX_PROFILE_SAMPLES - 1));
  const count = Math.ceil((hi - lo) / step - 1e-9) + 1;
  return { fromDeg: lo, toDeg: lo + (count - 1) * step, stepDeg: step, seen, arcSeen: arc.minDeg <= arc.maxDeg ? arc : null };
}


interface Scaling {
  /** Pixel value 1 stands for this luminance, cd/m². */
  referenceCdPerM2: number;
  peakBowCdPerM2: number;
  meaning: string;
}

/**
 * Linear colours per profile sample in `space`, scaled so that 1 is the reference luminance; gamut mapped per
 * sample. Several profiles (one per arc position, all on one ψ grid) share one scale: the brightest of them all.
 */
function profileColours(results: ProfileResult[], request: ProfileRequest, output: Output, space: LinearSpace) {
  const { grid, spectral } = results[0];
  const n = spectral.anglesDeg.length;
  const toCd = (spectra: Float64Array) => spectraToXyz(grid, spectra, request.observer).map((v) => v * LUMINOUS_EFFICACY_LM_PER_W);
  const parts = results.map((r) => {
    const perp = toCd(r.spectral.perpendicular);
    const par = toCd(r.spectral.parallel);
    return { perp, par, total: perp.map((v, k) => v + par[k]) };
  });
  let peakAll = 0;
  let peakBow = 0;
  for (const { total } of parts) {
    for (let i = 0; i < n; i++) {
      const y = total[3 * i + 1];
      peakAll = Math.max(peakAll, y);
      const psi = spectral.anglesDeg[i];
      if (psi >= BOW_WINDOW_DEG.fromDeg && psi <= BOW_WINDOW_DEG.toDeg) peakBow = Math.max(peakBow, y);
    }
  }
  const scaling: Scaling =
    output.normalise === "peak"
      ? { referenceCdPerM2: peakBow, peakBowCdPerM2: peakBow, meaning: "pixel luminance 1 = the brightest point of the bows (ψ 30°–60°)" }
      : { referenceCdPerM2: output.referenceCdPerM2, peakBowCdPerM2: peakBow, meaning: `pixel luminance 1 = ${output.referenceCdPerM2} cd/m²` };
  const sunWhite = results[0].sunWhite;
  // Gamut mapping wants white at Y = 1: map relative to the profile's peak, then scale to the reference.
  const relative = luminanceReciprocal(peakAll);
  // peakAll / reference, 0 where either is no light (never Infinity, whose product with 0 is NaN).
  const back = luminanceReciprocal(relative * scaling.referenceCdPerM2);
  let outOfGamut = 0;
  const render = (xyz: Float64Array, count: boolean) => {
    const r = renderXyz(
      xyz.map((v) => v * relative),
      { space, gamut: output.gamut, white: output.white, sunWhite },
    );
    if (count) for (const flag of r.outOfGamut) outOfGamut += flag;
    return r.linear.map((v) => v * back);
  };
  const colours = parts.map(
    ({ perp, par, total }): ProfileColours => ({
      fromDeg: spectral.anglesDeg[0],
      stepDeg: n > 1 ? spectral.anglesDeg[1] - spectral.anglesDeg[0] : 1,
      count: n,
      total: render(total, true),
      perpendicular: render(perp, false),
      parallel: render(par, false),
    }),
  );
  // Layers by order (one profile, spheres): each order with the whole profile's scale, white and gamut handling,
  // so that the layers compare and add up.
  const orders = results[0].orders?.map(({ spectral: s }): ProfileColours => {
    const [p, q] = [toCd(s.perpendicular), toCd(s.parallel)];
    return { ...colours[0], total: render(p.map((v, k) => v + q[k]), false), perpendicular: render(p, false), parallel: render(q, false) };
  });
  return { colours, scaling, outOfGamut, sunWhite, orders };
}

export interface PreparedOverlay {
  scene: Scene;
  hash: string;
  profile: ProfileResult;
  colours: ProfileColours;
  /** layers "by-order": each named order's colours (ORDER_LAYERS' order), drawn as the whole layer is. */
  orderColours?: ProfileColours[];
  /** Flattened drops: the profiles' colours at arc positions, blended per pixel; undefined for spheres. */
  arc?: ArcSlices;
  /** Alpha of every pixel that sees rain, or undefined for the additive layer. */
  alpha: number | undefined;
  manifest: OverlayManifest;
}

export type OverlayFormat = ImageQuery["format"];

/** The linear space pixels are computed in: the requested one, except for the 8-bit sRGB preview. */
export function renderSpaceFor(format: OverlayFormat, output: Output): LinearSpace {
  return format === "png" ? "srgb-linear" : output.space;
}

async function prepare(scene: Scene, format: OverlayFormat, deps: ViewDeps, layers: ProfileLayers): Promise<PreparedOverlay> {
  const pixels = scene.rays.widthPx * scene.rays.heightPx;
  if (layers === "by-order" && pixels > MAX_LAYERED_PIXELS) {
    throw new ClientError("invalid-request", `query field 'layers' "by-order" is for images up to ${MAX_LAYERED_PIXELS.toLocaleString("en")} pixels; this one has ${pixels.toLocaleString("en")}: ask fewer pixels or layers "combined"`, {
      field: "layers",
      allowed: `combined, or by-order up to ${MAX_LAYERED_PIXELS} pixels`,
    });
  }
  if (layers === "by-order" && scene.flattened) {
    throw new ClientError("invalid-request", `query field 'layers' "by-order" is for spherical drops: with body field 'scenario.drops.shape' (flattened drops) ask layers "combined"`, {
      field: "layers",
      allowed: "combined (with flattened drops)",
    });
  }
  // Rough water draws the reflection bow once per glitter group: over the synchronous budget (the Mie term-angles'
  // worth of time) the image goes to a job, as other costly renders do.
  const groups = scene.water?.rough?.surfaces.length ?? 0;
  const roughNs = pixels * groups * COST_NS.roughGroupPixel;
  const budgetNs = deps.limits.maxTermAngles * COST_NS.mieTermAngle;
  if (roughNs > budgetNs) {
    throw new ClientError(
      "too-costly",
      `rough water draws the reflection bow for each of ${groups} glitter groups: ${pixels.toLocaleString("en")} pixels × ${groups} is about ${(roughNs / 1e9).toFixed(1)} s of work, over the synchronous budget of about ${(budgetNs / 1e9).toFixed(1)} s. Submit it as a background job (POST /v1/jobs), or ask fewer pixels, a lower windSpeedMs or waterSurface "calm"`,
      { cost: roughNs / COST_NS.mieTermAngle, limit: deps.limits.maxTermAngles, jobs: "/v1/jobs" },
    );
  }
  if (format === "hdr" && scene.layer === "premultiplied") {
    throw new ClientError("invalid-request", "format hdr has no alpha channel: ask for layer \"additive\" or format exr", {
      field: "layer",
      allowed: "additive (with format=hdr)",
    });
  }
  const started = performance.now();
  const angles = profileAngles(scene);
  const grid = { fromDeg: angles.fromDeg, toDeg: angles.toDeg, stepDeg: angles.stepDeg };
  const request = profileRequestFor(scene, grid);
  const nodes = scene.flattened && angles.arcSeen ? arcNodesDeg(angles.arcSeen) : undefined;
  const profiles = nodes ? await arcProfiles(scene, grid, nodes, deps) : [await computeProfile(request, deps, {}, layers)];
  // The manifest describes the node nearest the side of the bow (90°), or the one profile.
  const base = nodes ? nearestIndex(nodes, 90) : 0;
  const profile = profiles[base];
  const space = renderSpaceFor(format, scene.output);
  const { colours: allColours, scaling, outOfGamut, orders } = profileColours(profiles, request, scene.output, space);
  const colours = allColours[base];
  const arc: ArcSlices | undefined = nodes ? { nodesDeg: Float64Array.from(nodes), slices: allColours, bows: profiles.map((p) => p.bows) } : undefined;
  const curtain = curtainTransmittance(profile.quadrature, request.water, request.pathLengthM);
  const alpha = scene.layer === "premultiplied" ? 1 - curtain.transmittance : undefined;
  const warnings = [...profile.meta.warnings];
  if (curtain.opticalDepth > SINGLE_SCATTERING_TAU) {
    warnings.push(
      `the rain curtain's optical depth is ${curtain.opticalDepth.toFixed(2)}: the single-scattering bow radiance is too high (multiple scattering and extinction inside the curtain are not modelled); shorten pathLengthM`,
    );
  }
  if (!angles.seen) warnings.push("no pixel sees rain (all below the horizon or beyond maxAngleDeg): the layer is empty");
  if (layers === "by-order" && !angles.seen) warnings.push("layers by-order: every layer is empty, as no pixel sees rain");
  const hash = overlayHash(scene.endpoint, scene.normalisedRequest);
  const antisolar = azimuthElevationOf(scene.antisolar);
  const chroma = spacePrimaries(space);
  // The camera (views) or the map (sky maps) follows the frame: the key order is the JSON's.
  const described =
    scene.description.kind === "camera"
      ? { endpoint: "/v1/view" as const, frame: worldFrameNote(), camera: scene.description }
      : { endpoint: "/v1/sky" as const, frame: worldFrameNote(), map: scene.description };
  const manifest: OverlayManifest = {
    ...described,
    sun: { ...scene.sunPosition, direction: scene.sunDirection },
    antisolarPoint: { azimuthDeg: antisolar.azimuthDeg, elevationDeg: antisolar.elevationDeg, direction: scene.antisolar },
    ground: scene.water
      ? "calm water below the horizon: pixels whose ray points below it (z < 0) show the sky's bows mirrored, times the water's Fresnel reflectance"
      : scene.ground
        ? "flat ground: pixels whose ray points below the horizon (z < 0) are empty (RGB and alpha 0)"
        : "no ground: the bows continue below the horizon",
    ...(scene.water ? { waterSurface: waterManifest(scene.water) } : {}),
    layer: {
      kind: scene.layer,
      channels: scene.layer === "premultiplied" ? "RGBA" : "RGB",
      meaning:
        scene.layer === "premultiplied"
          ? "premultiplied (associated) alpha: RGB = the rain's scattered radiance, A = 1 − T of the curtain; composite out = RGB + (1 − A)·background. PNG stores straight alpha (RGB/A, clamped to 1), as PNG requires"
          : "RGB to be added onto the background; the curtain's dimming of the background is left out",
      alpha: alpha ?? null,
      curtain: {
        ...curtain,
        pathLengthM: request.pathLengthM,
        model: "T = exp(−τ), τ = pathLengthM · Σ n(r) Q_ext π r², Q_ext from Lorenz–Mie theory at one wavelength (→ 2 for large drops: van de Hulst 1957 §8.22); the same path length along every ray",
      },
      curtainExtent: `the rain covers the sky out to ψ = ${scene.maxAngleDeg}° from the antisolar point; beyond it the layer is empty (no light, alpha 0)`,
    },
    scale: {
      normalisation: scene.output.normalise,
      meaning: scaling.meaning,
      referenceCdPerM2: scaling.referenceCdPerM2,
      factor: luminanceReciprocal(scaling.referenceCdPerM2),
      factorMeaning: "pixel value = absolute linear value (luminance in cd/m²) × factor",
      peakBowCdPerM2: scaling.peakBowCdPerM2,
    },
    units: {
      pixels: `linear ${space}${format === "png" ? " encoded with the sRGB transfer function (IEC 61966-2-1)" : ""}; ${scaling.meaning}`,
      radiance: "the profile's spectral radiance is in W m⁻² sr⁻¹ nm⁻¹, luminance in cd/m² (K_m = 683 lm/W)",
    },
    output: {
      format,
      space: format === "png" ? "srgb" : space,
      chromaticities: chroma,
      gamut: scene.output.gamut,
      white: scene.output.white,
      samplesOutOfGamut: outOfGamut,
      ...(format === "png"
        ? { quantising: "8 bits per channel with ordered dithering (Bayer 1973 8 × 8 threshold matrix, deterministic)" }
        : format === "png16"
          ? { quantising: "16 bits per channel, linear values clamped to 0..1, rounded (no dither); ICC profile of the space" }
          : format === "exr"
            ? { quantising: "half float, ZIP compression, chromaticities attribute" }
            : { quantising: "Radiance RGBE, PRIMARIES header" }),
    },
    profile: {
      anglesDeg: { fromDeg: angles.fromDeg, toDeg: angles.toDeg, stepDeg: angles.stepDeg, count: colours.count },
      seenAnglesDeg: angles.seen,
      interpolation: "linear in ψ; outside the profile the layer has no scattered light",
      bows: profile.bows,
      method: profile.meta.method,
      wavelengths: profile.meta.wavelengths,
      radii: profile.meta.radii,
      sun: profile.meta.sun,
      water: profile.meta.water,
      vision: profile.meta.vision,
      shape: profile.meta.shape,
    },
    ...(layers === "by-order" ? { layers: orderLayersManifest(scene.layer === "premultiplied" ? ["R", "G", "B", "A"] : ["R", "G", "B"]) } : {}),
    ...(nodes
      ? {
          arcPositions: {
            quantity: "angle around the antisolar point from the bow's highest point (0°) to its lowest (180°), left and right alike",
            nodesDeg: nodes,
            seenDeg: angles.arcSeen,
            stepDeg: ARC_NODE_STEP_DEG,
            interpolation: ARC_INTERPOLATION,
            tolerance: ARC_TOLERANCE,
            bows: nodes.map((a, k) => ({ arcPositionDeg: a, ...profiles[k].bows })),
            profileHashes: profiles.map((p) => p.meta.hash),
          },
        }
      : {}),
    hash,
    cache: profile.meta.cache,
    computeMs: Math.round((performance.now() - started) * 10) / 10,
    sources: [
      ...profile.meta.sources,
      "Beer–Lambert transmittance of the rain curtain; extinction paradox (van de Hulst 1957 §8.22)",
      `output chromaticities: ${chroma.source}`,
      ...(format === "png" ? ["IEC 61966-2-1 sRGB transfer; Bayer 1973 ordered dither"] : []),
    ],
    warnings,
  };
  return { scene, hash, profile, colours, arc, alpha, manifest, ...(orders ? { orderColours: orders } : {}) };
}

/**
 * The profiles of a bow of flattened drops at each arc node, on one ψ grid, computed together: their kernel tasks
 * share the pool's queue, so no thread waits for one profile's last task while another's could run. They share the
 * synchronous limit: each may spend its share, so the view as a whole is refused (422, to /v1/jobs) when their sum
 * is over it, before any of them starts.
 */
async function arcProfiles(scene: Scene, grid: { fromDeg: number; toDeg: number; stepDeg: number }, nodes: number[], deps: ViewDeps): Promise<ProfileResult[]> {
  const share: ViewDeps = { ...deps, limits: { maxTermAngles: deps.limits.maxTermAngles / nodes.length } };
  const bodies = nodes.map((node) => profileRequestFor(scene, grid, node));
  // The profiles along the arc fill the view's kernel stage together, each by its own cost (rows-progress.ts).
  const names = nodes.map((node, k) => `arc node ${k + 1} of ${nodes.length} (${node}°)`);
  const progress = deps.progress ? rowsProgress(names, (k) => [bodies[k], {}], deps.kernels.parallelism, { meter: deps.progress, stage: "kernels" }) : undefined;
  const plans = progress?.plans ?? bodies.map((body) => planProfile(body));
  const cost = plans.reduce((sum, plan) => sum + plan.cost, 0);
  if (plans.some((plan) => plan.cost > share.limits.maxTermAngles)) {
    throw new ClientError(
      "too-costly",
      `this ${scene.endpoint === "view" ? "view" : "sky map"} of flattened drops needs ${nodes.length} profiles along the arc (every ${ARC_NODE_STEP_DEG}°), about ${cost.toExponential(2)} Mie term-angles' worth; ` +
        `the synchronous limit is ${deps.limits.maxTermAngles.toExponential(2)}. Submit it as a background job (POST /v1/jobs), or use fewer wavelengths, a smaller image or drops.shape "sphere"`,
      { cost, limit: deps.limits.maxTermAngles, jobs: "/v1/jobs" },
    );
  }
  const profileAt = async (k: number) => {
    const part = progress?.part(k);
    const result = await computeProfile(bodies[k], { ...share, progress: part }, {}, "combined", plans[k]);
    part?.done();
    return result;
  };
  // Drops whose canting mean is taken by rotation over the pupil (lib/bow/canting-rotation.ts) give every node's rows
  // from one pass: the first node asks for them all (ShapedRowSpec.siblingArcsDeg) and the kernel cache keeps them,
  // so the other nodes, computed after it, find their rows there.
  if (!asksRotation(plans[0].kernelRequest)) return Promise.all(bodies.map((_, k) => profileAt(k)));
  plans[0] = { ...plans[0], kernelRequest: withSiblingArcs(plans[0].kernelRequest, nodes) };
  const head = await profileAt(0);
  return [head, ...(await Promise.all(bodies.slice(1).map((_, k) => profileAt(k + 1))))];
}

function nearestIndex(values: number[], target: number): number {
  let best = 0;
  for (let i = 1; i < values.length; i++) if (Math.abs(values[i] - target) < Math.abs(values[best] - target)) best = i;
  return best;
}

function waterManifest(w: WaterSurface) {
  const centre = azimuthElevationOf(w.reflectedAntisolar);
  return {
    kind: w.rough ? ("rough" as const) : ("calm" as const),
    ...(w.rough ? { rough: roughManifest(w.rough) } : {}),
    refractiveIndex: w.refractiveIndex,
    reflectionBowCentre: { azimuthDeg: centre.azimuthDeg, elevationDeg: centre.elevationDeg, direction: w.reflectedAntisolar },
    sunReflectance: { s: w.sunRs, p: w.sunRp, unpolarised: (w.sunRs + w.sunRp) / 2 },
    model:
      (w.rough ? "rough water (see rough.model; sunReflectance and reflectionBowCentre here are the level-water values): otherwise " : "") +
      "a level mirror: the sunlight it reflects (Fresnel reflectances Rs, Rp at incidence 90° − sun elevation; Born & Wolf 1999 §1.5.2) lights the " +
      "rain from below the horizon and makes a reflection bow about the antisolar point mirrored in the horizon, each polarisation scattered as " +
      "such; pixels below the horizon show the sky mirrored, each polarisation reflected with its own reflectance; alpha there is the curtain's " +
      "opacity times the water's reflectance (the curtain dims the reflected light, not the light from below the surface); the extra path " +
      "of the reflected light through the air is left out",
  };
}

function roughManifest(r: NonNullable<WaterSurface["rough"]>) {
  return {
    windSpeedMs: r.windSpeedMs,
    meanSquareSlope: r.meanSquareSlope,
    sunReflectance: r.totalReflectance,
    groups: r.surfaces.length,
    model:
      "wind-ruffled water: isotropic Gaussian facet slopes with mean square slope σ² = 0.003 + 5.12e-3·U (Cox & Munk 1954, clean surface; " +
      "the upwind/crosswind split and the Gram–Charlier skewness and peakedness are left out); each facet reflects the sunlight it intercepts " +
      "(projected-area factor cos ω/(cos β cos θ₀)) with its own Fresnel reflectances into its mirror direction; facets facing away from the sun " +
      "or reflecting down into the water are dropped (no shadowing, no second reflections); the facets are gathered in 0.5° bins of reflected " +
      "elevation, each lighting the rain from its mean elevation at the calm reflection's azimuth (the azimuthal spread is left out), with the " +
      "calm reflection's s direction; the water pixels still mirror the sky as a level surface (their blur is left out); " +
      "sunReflectance here is the sum of the groups' shares (the level water's is beside it, for comparison)",
  };
}

export function renderPrepared(p: PreparedOverlay): Layer {
  return renderWith(p, p.colours, p.alpha);
}

/** The scene's pixels from the given colours; alpha undefined draws RGB only. */
function renderWith(p: PreparedOverlay, colours: ProfileColours, alpha: number | undefined): Layer {
  return renderLayer({
    rays: p.scene.rays,
    antisolar: p.scene.antisolar,
    colours,
    ground: p.scene.ground,
    maxAngleDeg: p.scene.maxAngleDeg,
    alpha,
    polariserAxis: p.scene.polariserAxis,
    polariserTangentCos2: p.scene.polariserTangentCos2,
    water: p.scene.water,
    arc: p.arc,
  });
}

/**
 * The combined layer with each order drawn the same way (same pixels, polariser and water; RGB only) and the
 * remainder: the channels of a multi-layer EXR (order-layers.ts).
 */
export function renderPreparedByOrder(p: PreparedOverlay, layer: Layer): { channels: string[]; data: Float32Array } {
  const whole = layer.channels === 4 ? ["R", "G", "B", "A"] : ["R", "G", "B"];
  const parts = (p.orderColours ?? []).map((colours) => renderWith(p, colours, undefined).data);
  return withOrderLayers(layer.data, whole, parts, layer.widthPx * layer.heightPx);
}

let srgbTable: Float32Array | undefined;
/** Linear 0..1 in 1/65535 steps → encoded sRGB, from lib/colour's transfer function (IEC 61966-2-1). */
function srgbEncodeTable(): Float32Array {
  if (!srgbTable) {
    const space = outputSpace("srgb");
    srgbTable = new Float32Array(65536);
    for (let i = 0; i < 65536; i++) srgbTable[i] = encodeLinear(space, [i / 65535, 0, 0])[0];
  }
  return srgbTable;
}

/** Straight (unassociated) alpha, as PNG requires: colour = premultiplied RGB / A. */
function straightColour(value: number, alpha: number): number {
  return alpha > 0 ? value / alpha : 0;
}

async function encodePng(layer: Layer, bitDepth: 8 | 16, space: OutputSpaceId): Promise<{ png: Buffer; clamped: number }> {
  const { widthPx: w, heightPx: h, channels, data } = layer;
  const codes = bitDepth === 8 ? new Uint8Array(data.length) : new Uint16Array(data.length);
  const table = bitDepth === 8 ? srgbEncodeTable() : undefined;
  let clamped = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const at = (y * w + x) * channels;
      const a = channels === 4 ? data[at + 3] : 1;
      for (let k = 0; k < channels; k++) {
        let v = k === 3 ? a : straightColour(data[at + k], a);
        if (v < 0 || v > 1) {
          clamped++;
          v = Math.min(1, Math.max(0, v));
        }
        if (table) {
          const encoded = k === 3 ? v : table[Math.round(v * 65535)];
          codes[at + k] = ditheredCode8(encoded, x, y);
        } else codes[at + k] = Math.round(v * 65535);
      }
    }
  }
  let image = sharp(codes, { raw: { width: w, height: h, channels } });
  if (bitDepth === 16) image = image.toColourspace("rgb16");
  const plain = await image.png({ compressionLevel: 6, palette: false }).toBuffer();
  return { png: withSpaceColourChunks(plain, space), clamped };
}

export interface OverlayFile {
  body: Buffer;
  contentType: string;
  manifest: OverlayManifest & { clampedComponents?: number };
}

export async function encodeOverlay(p: PreparedOverlay, format: OverlayFormat): Promise<OverlayFile> {
  const layer = renderPrepared(p);
  const space = renderSpaceFor(format, p.scene.output);
  const chroma = spacePrimaries(space);
  const manifest = p.manifest;
  switch (format) {
    case "exr": {
      const layered = p.orderColours ? renderPreparedByOrder(p, layer) : undefined;
      return {
        body: encodeExr({
          width: layer.widthPx,
          height: layer.heightPx,
          channels: layered?.channels ?? (layer.channels === 4 ? ["R", "G", "B", "A"] : ["R", "G", "B"]),
          data: layered?.data ?? layer.data,
          pixelType: "half",
          compression: "zip",
          chromaticities: { red: chroma.red, green: chroma.green, blue: chroma.blue, white: chroma.white },
          attributes: {
            comments: `antisolar bow layer (${p.scene.layer}); linear ${space}; ${manifest.scale.meaning}`,
            "antisolar:hash": p.hash,
          },
        }),
        contentType: "image/x-exr",
        manifest,
      };
    }
    case "hdr":
      return {
        body: encodeRadianceHdr({
          width: layer.widthPx,
          height: layer.heightPx,
          data: layer.data,
          primaries: [chroma.red, chroma.green, chroma.blue, chroma.white],
        }),
        contentType: "image/vnd.radiance",
        manifest,
      };
    case "png16":
    case "png": {
      const { png, clamped } = await encodePng(layer, format === "png" ? 8 : 16, format === "png" ? "srgb" : space);
      return { body: png, contentType: "image/png", manifest: { ...manifest, clampedComponents: clamped } };
    }
  }
}

export function prepareView(body: ViewRequest, format: OverlayFormat, deps: ViewDeps, layers: ProfileLayers = "combined"): Promise<PreparedOverlay> {
  return prepare(viewScene(body), format, deps, layers);
}

export function prepareSky(body: SkyRequest, format: OverlayFormat, deps: ViewDeps, layers: ProfileLayers = "combined"): Promise<PreparedOverlay> {
  return prepare(skyScene(body), format, deps, layers);
}
