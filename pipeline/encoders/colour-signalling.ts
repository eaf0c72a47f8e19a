import Color from "colorjs.io";
import { adapt } from "colorjs.io/src/CATs.js";
import { fromRows, multiplyMatrix3, type Matrix3 } from "../../lib/colour/matrix3.js";
import { colorjsD65White, outputSpace, type OutputSpaceId } from "../../lib/colour/output-spaces.js";
import { buildMatrixTrcProfile, ICC_PCS_D50, type ParametricCurve } from "./icc-profile.js";
import type { CicpCode } from "./png-chunks.js";

/** IEC 61966-2-1:1999 sRGB decoding as an ICC type-3 curve: Y = (aX + b)^g for X ≥ d, else cX. */
const SRGB_CURVE: ParametricCurve = { functionType: 3, params: [2.4, 1 / 1.055, 0.055 / 1.055, 1 / 12.92, 0.04045] };
const LINEAR_CURVE: ParametricCurve = { functionType: 0, params: [1] };
/** colorjs.io's "rec2020" decodes with the BT.1886 reference EOTF (γ = 2.4, zero black lift), not the inverse OETF. */
const BT1886_CURVE: ParametricCurve = { functionType: 0, params: [2.4] };

interface SpaceSignalling {
  readonly description: string;
  readonly curve: ParametricCurve;
  /** ITU-T H.273 code points, or null where none describes the encoding exactly. */
  readonly cicp: CicpCode | null;
  readonly note?: string;
}

// H.273 Table 2 (primaries) 1 = BT.709, 9 = BT.2020, 12 = SMPTE EG 432-1; Table 3 (transfer) 8 = linear, 13 = IEC 61966-2-1.
const SIGNALLING: Record<OutputSpaceId, SpaceSignalling> = {
  srgb: { description: "antisolar sRGB (IEC 61966-2-1)", curve: SRGB_CURVE, cicp: { colourPrimaries: 1, transferCharacteristics: 13, matrixCoefficients: 0, videoFullRangeFlag: 1 } },
  "srgb-linear": { description: "antisolar linear sRGB (BT.709 primaries, D65)", curve: LINEAR_CURVE, cicp: { colourPrimaries: 1, transferCharacteristics: 8, matrixCoefficients: 0, videoFullRangeFlag: 1 } },
  "display-p3": { description: "antisolar Display P3 (P3 primaries, D65, sRGB curve)", curve: SRGB_CURVE, cicp: { colourPrimaries: 12, transferCharacteristics: 13, matrixCoefficients: 0, videoFullRangeFlag: 1 } },
  rec2020: {
    description: "antisolar Rec. 2020 (gamma 2.4 display curve)",
    curve: BT1886_CURVE,
    cicp: null,
    note: "No cICP: H.273 transfer codes 1/14/15 name the BT.2020 camera curve, which decoders invert literally; cICP would override the exact gamma-2.4 ICC profile.",
  },
  acescg: { description: "antisolar ACEScg (AP1 primaries, ACES white, linear)", curve: LINEAR_CURVE, cicp: null, note: "ACEScg has no H.273 code points; colour is carried by the ICC profile only." },
  "xyz-d65": { description: "antisolar CIE XYZ (D65-relative, linear)", curve: LINEAR_CURVE, cicp: null, note: "XYZ has no H.273 code points; the ICC profile uses the X, Y, Z axes as primaries. Z of the D65 white exceeds 1 and is clipped." },
};

/** Fixed so identical requests give byte-identical PNGs (so a content hash names one file). */
const PROFILE_CREATED = new Date(Date.UTC(2026, 0, 1));

type Vec3 = [number, number, number];

/** Columns of the map colorjs.io applies from linear coordinates of the space to XYZ-D65. */
function xyzD65FromLinear(colorjsId: string): Matrix3 {
  const cols = [0, 1, 2].map((j) => {
    const unit: Vec3 = [0, 0, 0];
    unit[j] = 1;
    return new Color(colorjsId, unit).to("xyz-d65").coords.map((v) => Number(v));
  });
  return [cols[0][0], cols[1][0], cols[2][0], cols[0][1], cols[1][1], cols[2][1], cols[0][2], cols[1][2], cols[2][2]];
}

export interface SpaceColourMetadata {
  readonly profile: Buffer;
  readonly iccDescription: string;
  readonly cicp: CicpCode | null;
  readonly note?: string;
}

const cache = new Map<OutputSpaceId, SpaceColourMetadata>();

/**
 * ICC matrix/TRC profile and cICP for an output space. Colorants: colorjs.io's linear → XYZ-D65 map followed by
 * Bradford D65 → ICC D50 (the linear Bradford transform of ICC.1 Annex E, as public colour-management code cites it for 'chad').
 */
export function colourMetadataFor(id: OutputSpaceId): SpaceColourMetadata {
  const cached = cache.get(id);
  if (cached) return cached;
  const space = outputSpace(id);
  const s = SIGNALLING[id];
  const d50: Vec3 = [...ICC_PCS_D50] as Vec3;
  const d50FromD65 = fromRows(adapt(colorjsD65White(), d50, "Bradford"));
  const nativeWhite = [...Color.Space.get(space.linearColorjsId).white] as Vec3;
  const meta: SpaceColourMetadata = {
    profile: buildMatrixTrcProfile({
      description: s.description,
      copyright: "No copyright, use freely",
      pcsFromLinearRgb: multiplyMatrix3(d50FromD65, xyzD65FromLinear(space.linearColorjsId)),
      chromaticAdaptation: fromRows(adapt(nativeWhite, d50, "Bradford")),
      curve: s.curve,
      created: PROFILE_CREATED,
    }),
    iccDescription: s.description,
    cicp: s.cicp,
    ...(s.note ? { note: s.note } : {}),
  };
  cache.set(id, meta);
  return meta;
}
