// One drop, one wavelength: the request's refractive index and size parameter, then the chosen engine.

import type { ScatterRequest } from "../../schemas/scatter.js";
import { angleCount, angleSamples } from "../../schemas/angles.js";
import { dropMedia } from "../../lib/water/drop-medium.js";
import { mieCoefficients } from "../../lib/mie/coefficients.js";
import { mieAmplitudes } from "../../lib/mie/amplitudes.js";
import { mieEfficiencies } from "../../lib/mie/efficiencies.js";
import { mieTermCount } from "../../lib/mie/termCount.js";
import { debyeCoefficients } from "../../lib/mie/debye.js";
import type { MieCoefficients } from "../../lib/mie/types.js";
import { airyBowIntensity } from "../../lib/rays/airy-bow.js";
import { geometricIntensity } from "../../lib/rays/geometric-intensity.js";
import type { ScatterResponse } from "../../schemas/responses/optics-response.js";

export const DEFAULT_AIRY_ORDERS = [2, 3];
export const DEFAULT_GEOMETRIC_ORDERS = [0, 1, 2, 3, 4, 5, 6];

interface Medium {
  mRe: number;
  mIm: number;
  /** Wavelength in the surrounding medium, nm. */
  mediumWavelengthNm: number;
  source: string;
}

function medium(body: ScatterRequest): Medium {
  if (body.refractiveIndex) {
    return {
      mRe: body.refractiveIndex.re,
      mIm: body.refractiveIndex.im,
      mediumWavelengthNm: body.wavelengthNm,
      source: "given by the request; wavelengthNm taken as the wavelength in the surrounding medium",
    };
  }
  const water = body.water ?? { temperatureC: 20, salinityPsu: 0 };
  const { media, source } = dropMedia(water, [body.wavelengthNm]);
  const { mRe, mIm, nAir } = media[0];
  return { mRe, mIm, mediumWavelengthNm: body.wavelengthNm / nAir, source };
}

export function scatterCost(body: ScatterRequest): { terms: number; angles: number; termAngles: number } {
  const m = medium(body);
  const x = (2 * Math.PI * body.radiusUm * 1000) / m.mediumWavelengthNm;
  const angles = angleCount(body.scatteringAngles);
  const terms = body.method === "mie" || body.method === "debye" ? mieTermCount(x) : 1;
  return { terms, angles, termAngles: terms * angles };
}

export function computeScatter(body: ScatterRequest): ScatterResponse {
  const started = performance.now();
  const m = medium(body);
  const x = (2 * Math.PI * body.radiusUm * 1000) / m.mediumWavelengthNm;
  const thetaDeg = angleSamples(body.scatteringAngles);
  let perpendicular: Float64Array;
  let parallel: Float64Array;
  let extra: Pick<ScatterResponse, "qExt" | "qSca" | "qBack" | "g" | "debyeOrder" | "terms" | "orders"> = {};
  const warnings: string[] = [];

  if (body.method === "mie" || body.method === "debye") {
    const order = body.debyeOrder ?? 2;
    const c: MieCoefficients = body.method === "mie" ? mieCoefficients(m.mRe, m.mIm, x) : debyeCoefficients(m.mRe, m.mIm, x, order);
    const cosTheta = thetaDeg.map((t) => Math.cos((t * Math.PI) / 180));
    const amp = mieAmplitudes(c, cosTheta);
    perpendicular = new Float64Array(thetaDeg.length);
    parallel = new Float64Array(thetaDeg.length);
    for (let j = 0; j < thetaDeg.length; j++) {
      perpendicular[j] = amp.s1Re[j] ** 2 + amp.s1Im[j] ** 2;
      parallel[j] = amp.s2Re[j] ** 2 + amp.s2Im[j] ** 2;
    }
    extra = body.method === "mie" ? { ...mieEfficiencies(c, x), terms: c.nTerms } : { debyeOrder: order, terms: c.nTerms };
  } else {
    if (m.mIm > 0) warnings.push("ray optics and Airy theory here ignore absorption (the imaginary part)");
    const orders = body.orders ?? (body.method === "airy" ? DEFAULT_AIRY_ORDERS : DEFAULT_GEOMETRIC_ORDERS);
    perpendicular = new Float64Array(thetaDeg.length);
    parallel = new Float64Array(thetaDeg.length);
    for (const p of orders) {
      const part = body.method === "airy" ? airyBowIntensity(m.mRe, x, p - 1, thetaDeg) : geometricIntensity(m.mRe, x, p - 1, thetaDeg);
      for (let j = 0; j < thetaDeg.length; j++) {
        perpendicular[j] += part.perpendicular[j];
        parallel[j] += part.parallel[j];
      }
    }
    extra = { orders };
    if (body.method === "geometric") warnings.push("ray optics diverges at bow angles (caustics); values there are not finite in nature");
  }
  const degreeOfPolarisation = perpendicular.map((a, j) => {
    const s = a + parallel[j];
    return s > 0 ? (a - parallel[j]) / s : 0;
  });
  return {
    scatteringAngleDeg: Array.from(thetaDeg),
    intensityPerpendicular: finiteArray(perpendicular),
    intensityParallel: finiteArray(parallel),
    degreeOfPolarisation: Array.from(degreeOfPolarisation),
    sizeParameter: x,
    refractiveIndex: { re: m.mRe, im: m.mIm },
    ...extra,
    meta: {
      method: body.method,
      units: {
        intensityPerpendicular: "|S1|² (i1 of van de Hulst 1957), dimensionless (Bohren & Huffman 1983): dσ/dΩ = |S|²/k² for that polarisation",
        intensityParallel: "|S2|² (i2 of van de Hulst 1957), dimensionless, as intensityPerpendicular",
        scatteringAngleDeg: "degrees, 0 = forward",
      },
      refractiveIndexSource: m.source,
      mediumWavelengthNm: m.mediumWavelengthNm,
      computeMs: Math.round((performance.now() - started) * 10) / 10,
      warnings,
    },
  };
}

/** JSON has no Infinity: a ray-optics caustic sample is reported as null. */
function finiteArray(values: Float64Array): (number | null)[] {
  return Array.from(values, (v) => (Number.isFinite(v) ? v : null));
}
