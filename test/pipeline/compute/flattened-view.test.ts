// Camera views of flattened drops: every pixel takes its own arc position, between profiles computed at arc nodes.
// The reference is POST /v1/profile's computation at the same arc position (computeProfile), whose physics
// test/pipeline/compute/flattened-profile.test.ts and test/lib/rays/shaped-drops.test.ts check against published
// results; here: that the pixels are those profiles, and Fraser's (1983) fact of the trade seen in the image itself.

import { beforeAll, describe, expect, it } from "vitest";
import { skyRequestSchema, viewRequestSchema } from "../../../schemas/view.js";
import { profileRequestSchema } from "../../../schemas/profile.js";
import { cameraOf, FLATTENED_MIN_PROFILE_STEP_DEG, prepareSky, prepareView, renderPrepared, type PreparedOverlay, type ViewDeps } from "../../../pipeline/compute/view.js";
import { computeProfile, type ProfileResult } from "../../../pipeline/compute/profile.js";
import { KernelService } from "../../../pipeline/kernels/kernel-service.js";
import { createInlinePool } from "../../../pipeline/kernels/worker-pool.js";
import { cameraRayField } from "../../../lib/view/camera.js";
import { angleFromAntisolarDeg } from "../../../lib/view/layer.js";
import { arcPositionDeg } from "../../../lib/view/arc-position.js";
import { azimuthElevationOf, directionFromAzimuthElevation } from "../../../lib/view/vectors.js";
import type { Layer } from "../../../lib/view/layer.js";
import { viewManifestSchema } from "../../../schemas/responses/overlay-response.js";

const kernels = new KernelService({ memoryBudgetBytes: 2 ** 30, compute: createInlinePool().compute });
const deps: ViewDeps = { kernels, limits: { maxTermAngles: Infinity } };
const DEG = Math.PI / 180;

// Two wavelengths about 550 nm keep the shaped rows cheap (as flattened-profile.test.ts); 2 mm drops, sun 10° up.
const SUN = { azimuthDeg: 240, elevationDeg: 10 };
const scenario = {
  drops: { kind: "monodisperse", radiusUm: 1000, numberPerM3: 1000, shape: { kind: "equilibrium" } },
  spectral: { fromNm: 540, toNm: 560, stepNm: 20 },
};
// Pixels in absolute luminance: XYZ with Y in cd/m² (reference 1 cd/m², no white adaptation), so G is the luminance.
const output = { space: "xyz-d65", gamut: "clip", white: "absolute", normalise: "physical", referenceCdPerM2: 1 };
const antisolar = directionFromAzimuthElevation(SUN.azimuthDeg + 180, -SUN.elevationDeg);

/** The bow point at ψ and arc position α (0 = top, 90 = side) in the world frame: cos ψ·a + sin ψ·(cos α·t̂ + sin α·ŝ). */
function bowDirection(psiDeg: number, alphaDeg: number): number[] {
  const t = directionFromAzimuthElevation(SUN.azimuthDeg + 180, 90 - SUN.elevationDeg);
  const s = [antisolar[1] * t[2] - antisolar[2] * t[1], antisolar[2] * t[0] - antisolar[0] * t[2], antisolar[0] * t[1] - antisolar[1] * t[0]];
  const c = Math.cos(psiDeg * DEG);
  const n = Math.sin(psiDeg * DEG);
  return [0, 1, 2].map((k) => c * antisolar[k] + n * (Math.cos(alphaDeg * DEG) * t[k] + Math.sin(alphaDeg * DEG) * s[k]));
}

/** A narrow camera whose centre pixel (odd size: pixel 15's centre is the principal point) looks at ψ, α on the bow. */
function cameraAt(psiDeg: number, alphaDeg: number) {
  const { azimuthDeg, elevationDeg } = azimuthElevationOf(bowDirection(psiDeg, alphaDeg));
  return { yawDeg: azimuthDeg, pitchDeg: elevationDeg, widthPx: 31, heightPx: 31, horizontalFovDeg: 4 };
}

interface Shot {
  prepared: PreparedOverlay;
  layer: Layer;
  /** ψ and arc position of pixel (x, y). */
  at(x: number, y: number): { psi: number; alpha: number };
}

async function shoot(camera: object): Promise<Shot> {
  const body = viewRequestSchema.parse({ scenario, sun: SUN, camera, ground: false, layer: "additive", output });
  const prepared = await prepareView(body, "exr", deps);
  const rays = cameraRayField(cameraOf(body));
  const d = new Float64Array(3);
  return {
    prepared,
    layer: renderPrepared(prepared),
    at(x, y) {
      rays.ray(x, y, d);
      return { psi: angleFromAntisolarDeg(d, antisolar), alpha: arcPositionDeg(d, antisolar) };
    },
  };
}

/** POST /v1/profile's computation for the view's own ψ grid at an arc position. */
function profileAt(shot: Shot, arcPositionDeg: number): Promise<ProfileResult> {
  const a = shot.prepared.manifest.profile.anglesDeg;
  const body = profileRequestSchema.parse({
    ...scenario,
    sun: { elevationDeg: SUN.elevationDeg },
    angles: { fromDeg: a.fromDeg, toDeg: a.toDeg, stepDeg: a.stepDeg },
    arcPositionDeg,
    output: { space: "xyz-d65", gamut: "clip", normalise: "physical", white: "absolute" },
  });
  return computeProfile(body, deps);
}

function luminanceAt(p: ProfileResult, psi: number): number {
  const a = p.spectral.anglesDeg;
  const t = (psi - a[0]) / (a[1] - a[0]);
  const i = Math.min(Math.floor(t), a.length - 2);
  return p.colour.luminanceCdPerM2[i] * (1 - (t - i)) + p.colour.luminanceCdPerM2[i + 1] * (t - i);
}

const pixelY = (shot: Shot, x: number, y: number) => shot.layer.data[(y * shot.layer.widthPx + x) * shot.layer.channels + 1];

describe("a camera view of 2 mm flattened drops (equilibrium shapes, canting 7.5°): the bow changes along the arc", () => {
  let top: Shot;
  let side: Shot;
  beforeAll(async () => {
    top = await shoot(cameraAt(42, 0));
    side = await shoot(cameraAt(41.8, 90));
  }, 1_200_000);

  it("the manifest states the arc nodes the pixels blend between, and the shape", () => {
    expect(top.prepared.manifest.arcPositions?.nodesDeg).toEqual([0, 5]);
    expect(side.prepared.manifest.arcPositions?.nodesDeg).toEqual([85, 90, 95]);
    expect(side.prepared.manifest.arcPositions?.interpolation).toMatch(/warped/);
    expect(side.prepared.manifest.profile.shape?.model).toMatch(/Beard & Chuang 1987/);
    expect(side.prepared.manifest.profile.shape?.arcPositionDeg).toBe(90);
    // The published response schema (GET /openapi.json) holds the manifest with its arc positions.
    expect(viewManifestSchema.safeParse(JSON.parse(JSON.stringify(side.prepared.manifest))).error).toBeUndefined();
  });

  it("pixels at the top of the bow (arc 0°) are /v1/profile at arcPositionDeg 0, pixels at its side that at 90°", async () => {
    const atTop = await profileAt(top, 0);
    expect(atTop.meta.hash).toBe(top.prepared.manifest.arcPositions?.profileHashes[0]);
    const peak = Math.max(...atTop.colour.luminanceCdPerM2);
    // The centre column looks straight up through the antisolar point: arc position 0 (to round-off).
    for (let y = 0; y < 31; y++) {
      const { psi, alpha } = top.at(15, y);
      expect(alpha).toBeLessThan(1e-6);
      // Float32 pixels: 1e-5 of the peak.
      expect(Math.abs(pixelY(top, 15, y) - luminanceAt(atTop, psi))).toBeLessThan(1e-5 * peak);
    }
    const atSide = await profileAt(side, 90);
    const { psi, alpha } = side.at(15, 15);
    expect(alpha).toBeCloseTo(90, 6);
    expect(Math.abs(pixelY(side, 15, 15) - luminanceAt(atSide, psi))).toBeLessThan(1e-5 * Math.max(...atSide.colour.luminanceCdPerM2));
  }, 600_000);

  it("a long lens's pixels smaller than the kernel lattice's coarsest step: flattened drops' profile keeps that step, spheres' follows the pixels", async () => {
    // 31 px over 1°: pixels of 0.032°, which would put the rows on the 0.01° lattice (5× the rows' cost).
    const narrow = { ...cameraAt(42, 0), horizontalFovDeg: 1 };
    const flattened = await shoot(narrow);
    expect(flattened.prepared.manifest.profile.anglesDeg.stepDeg).toBe(FLATTENED_MIN_PROFILE_STEP_DEG);
    const body = viewRequestSchema.parse({ scenario: { ...scenario, drops: { ...scenario.drops, shape: { kind: "sphere" } } }, sun: SUN, camera: narrow, ground: false, layer: "additive", output });
    const spheres = await prepareView(body, "exr", deps);
    expect(spheres.manifest.profile.anglesDeg.stepDeg).toBeCloseTo(1 / 31, 3);
    // Its pixels are still the profiles' (linear in ψ, blended along the arc): the image is not empty and the bow is in it.
    expect(Math.max(...flattened.layer.data)).toBeGreaterThan(0);
  }, 600_000);

  it("Fraser (1983, J. Opt. Soc. Am. 73, 1626): the top of the primary is weaker than its side, in the image", () => {
    // Brightest pixel within ψ 38°–46° (about the sphere's bow, as flattened-profile.test.ts) at the top (arc < 1°) and at the side (89°–91°).
    const brightest = (shot: Shot, arc: (a: number) => boolean) => {
      let best = 0;
      for (let y = 0; y < 31; y++) {
        for (let x = 0; x < 31; x++) {
          const { psi, alpha } = shot.at(x, y);
          if (psi >= 38 && psi <= 46 && arc(alpha)) best = Math.max(best, pixelY(shot, x, y));
        }
      }
      return best;
    };
    const atTop = brightest(top, (a) => a < 1);
    const atSide = brightest(side, (a) => Math.abs(a - 90) <= 1);
    // Measured in the profiles: the top peaks at 0.25 of the side (flattened-profile.test.ts); half is the bound there too.
    expect(atTop).toBeGreaterThan(0);
    expect(atTop).toBeLessThan(0.5 * atSide);
  });
});

describe("spheres: drops.shape sphere leaves views and sky maps as they were (a sphere's bow is the same all along the arc)", () => {
  const spheres = { drops: { kind: "monodisperse", radiusUm: 500, numberPerM3: 1000 }, spectral: { fromNm: 380, toNm: 780, stepNm: 20 } };
  it.each([
    ["view", { sun: SUN, camera: { widthPx: 64, heightPx: 36 } }],
    ["sky", { sun: SUN, widthPx: 64, heightPx: 32 }],
  ])("%s", async (endpoint, rest) => {
    const make = async (drops: object) => {
      const body = { scenario: { ...spheres, drops }, ...rest };
      const p = endpoint === "view" ? await prepareView(viewRequestSchema.parse(body), "exr", deps) : await prepareSky(skyRequestSchema.parse(body), "exr", deps);
      return { p, layer: renderPrepared(p) };
    };
    const plain = await make(spheres.drops);
    const sphere = await make({ ...spheres.drops, shape: { kind: "sphere" } });
    expect(sphere.p.manifest.arcPositions).toBeUndefined();
    expect(Buffer.from(sphere.layer.data.buffer).equals(Buffer.from(plain.layer.data.buffer))).toBe(true);
  });
});
