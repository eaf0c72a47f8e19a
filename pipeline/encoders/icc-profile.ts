import { createHash } from "node:crypto";
import type { Matrix3 } from "../../lib/colour/matrix3.js";

/** ICC.1:2010 §7.2.16: the PCS illuminant, as nominally encoded in every profile header. */
export const ICC_PCS_D50: readonly [number, number, number] = [0.9642, 1.0, 0.8249];

/** A 'para' tone curve (ICC.1:2010 clause 10, parametricCurveType): function type and its parameters in spec order. */
export type ParametricCurve =
  | { readonly functionType: 0; readonly params: readonly [g: number] }
  | { readonly functionType: 3; readonly params: readonly [g: number, a: number, b: number, c: number, d: number] };

export interface MatrixTrcProfileSpec {
  /** Shown by viewers as the profile name (ASCII kept to one 'mluc' record, en-US). */
  readonly description: string;
  readonly copyright: string;
  /** PCS XYZ (D50-adapted, Y = 1 for the white) from linear device RGB; its columns become rXYZ/gXYZ/bXYZ. */
  readonly pcsFromLinearRgb: Matrix3;
  /** Adaptation from the device's own white to the PCS illuminant, written as the chromaticAdaptationTag 'chad'. */
  readonly chromaticAdaptation: Matrix3;
  /** One curve shared by the three channels. */
  readonly curve: ParametricCurve;
  /** Header creation date; fixed by callers so identical requests give identical bytes. */
  readonly created: Date;
}

const HEADER_BYTES = 128; // ICC.1:2010 §7.2.1
const TAG_ENTRY_BYTES = 12; // ICC.1:2010 §7.3.1

function sig(text: string): number {
  return Buffer.from(text, "latin1").readUInt32BE(0);
}

/** s15Fixed16Number, ICC.1:2010 §4.6. */
function s15Fixed16(value: number): number {
  const scaled = Math.round(value * 65536);
  if (scaled < -0x80000000 || scaled > 0x7fffffff) throw new RangeError(`${value} does not fit s15Fixed16`);
  return scaled;
}

function pad4(buf: Buffer): Buffer {
  const rem = buf.length % 4;
  return rem === 0 ? buf : Buffer.concat([buf, Buffer.alloc(4 - rem)]);
}

/** XYZType, ICC.1:2010 clause 10. */
function xyzTag(xyz: readonly number[]): Buffer {
  const b = Buffer.alloc(20);
  b.writeUInt32BE(sig("XYZ "), 0);
  xyz.forEach((v, i) => b.writeInt32BE(s15Fixed16(v), 8 + 4 * i));
  return b;
}

/** s15Fixed16ArrayType, ICC.1:2010 clause 10; 'chad' stores the matrix row by row. */
function sf32Tag(values: readonly number[]): Buffer {
  const b = Buffer.alloc(8 + 4 * values.length);
  b.writeUInt32BE(sig("sf32"), 0);
  values.forEach((v, i) => b.writeInt32BE(s15Fixed16(v), 8 + 4 * i));
  return b;
}

/** multiLocalizedUnicodeType with a single en-US record, ICC.1:2010 clause 10. */
function mlucTag(text: string): Buffer {
  const utf16be = Buffer.from(text, "utf16le").swap16();
  const head = Buffer.alloc(28);
  head.writeUInt32BE(sig("mluc"), 0);
  head.writeUInt32BE(1, 8); // number of records
  head.writeUInt32BE(12, 12); // record size
  head.write("enUS", 16, "latin1");
  head.writeUInt32BE(utf16be.length, 20);
  head.writeUInt32BE(28, 24); // string offset from tag start
  return Buffer.concat([head, utf16be]);
}

/** parametricCurveType, ICC.1:2010 clause 10. */
function paraTag(curve: ParametricCurve): Buffer {
  const b = Buffer.alloc(12 + 4 * curve.params.length);
  b.writeUInt32BE(sig("para"), 0);
  b.writeUInt16BE(curve.functionType, 8);
  curve.params.forEach((v, i) => b.writeInt32BE(s15Fixed16(v), 12 + 4 * i));
  return b;
}

function column(m: Matrix3, j: number): number[] {
  return [m[j], m[3 + j], m[6 + j]];
}

/**
 * A version 4.3 three-component matrix/TRC display profile (ICC.1:2010 clause 8, required tags of an RGB display profile):
 * desc, cprt, wtpt, chad, rXYZ/gXYZ/bXYZ, rTRC/gTRC/bTRC, with the three TRC tags sharing one curve.
 */
export function buildMatrixTrcProfile(spec: MatrixTrcProfileSpec): Buffer {
  const curve = paraTag(spec.curve);
  const tags: [string, Buffer][] = [
    ["desc", mlucTag(spec.description)],
    ["cprt", mlucTag(spec.copyright)],
    // v4 display profiles carry the PCS illuminant as media white (ICC.1:2010 mediaWhitePointTag).
    ["wtpt", xyzTag(ICC_PCS_D50)],
    ["chad", sf32Tag(spec.chromaticAdaptation)],
    ["rXYZ", xyzTag(column(spec.pcsFromLinearRgb, 0))],
    ["gXYZ", xyzTag(column(spec.pcsFromLinearRgb, 1))],
    ["bXYZ", xyzTag(column(spec.pcsFromLinearRgb, 2))],
    ["rTRC", curve],
    ["gTRC", curve],
    ["bTRC", curve],
  ];

  const tableBytes = 4 + TAG_ENTRY_BYTES * tags.length;
  const table = Buffer.alloc(tableBytes);
  table.writeUInt32BE(tags.length, 0);
  const blobs: Buffer[] = [];
  const placed = new Map<Buffer, number>();
  let offset = HEADER_BYTES + tableBytes;
  tags.forEach(([name, data], i) => {
    let at = placed.get(data);
    if (at === undefined) {
      at = offset;
      placed.set(data, at);
      const padded = pad4(data);
      blobs.push(padded);
      offset += padded.length;
    }
    const e = 4 + TAG_ENTRY_BYTES * i;
    table.writeUInt32BE(sig(name), e);
    table.writeUInt32BE(at, e + 4);
    table.writeUInt32BE(data.length, e + 8);
  });

  const header = Buffer.alloc(HEADER_BYTES);
  header.writeUInt32BE(offset, 0); // §7.2.2 profile size
  header.writeUInt32BE(0x04300000, 8); // §7.2.4 version 4.3.0.0
  header.write("mntr", 12, "latin1"); // §7.2.5 display device class
  header.write("RGB ", 16, "latin1"); // §7.2.6 data colour space
  header.write("XYZ ", 20, "latin1"); // §7.2.7 PCS
  const d = spec.created;
  [d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate(), d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds()].forEach(
    (v, i) => header.writeUInt16BE(v, 24 + 2 * i), // §7.2.8 dateTimeNumber
  );
  header.write("acsp", 36, "latin1"); // §7.2.9 profile file signature
  header.writeUInt32BE(0, 64); // §7.2.15 rendering intent: perceptual
  ICC_PCS_D50.forEach((v, i) => header.writeInt32BE(s15Fixed16(v), 68 + 4 * i)); // §7.2.16

  const profile = Buffer.concat([header, table, ...blobs]);
  // §7.2.18: profile ID = MD5 of the profile with flags, rendering intent and profile ID fields zeroed (already zero).
  createHash("md5").update(profile).digest().copy(profile, 84);
  return profile;
}
