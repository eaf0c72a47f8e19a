import Color from "colorjs.io";

/** CIEDE2000 colour difference (Luo, Cui & Rigg 2001) per sample of two interleaved XYZ-D65 arrays (white Y = 1), via colorjs.io deltaE "2000". */
export function deltaE2000(xyzA: Float64Array, xyzB: Float64Array): Float64Array {
  if (xyzA.length !== xyzB.length || xyzA.length % 3 !== 0) throw new RangeError("XYZ arrays must have equal length, a multiple of 3");
  const out = new Float64Array(xyzA.length / 3);
  for (let s = 0; s < out.length; s++) {
    const a = new Color("xyz-d65", [xyzA[3 * s], xyzA[3 * s + 1], xyzA[3 * s + 2]]);
    const b = new Color("xyz-d65", [xyzB[3 * s], xyzB[3 * s + 1], xyzB[3 * s + 2]]);
    out[s] = a.deltaE(b, "2000");
  }
  return out;
}

export function maxOf(values: Float64Array): number {
  let m = -Infinity;
  for (const v of values) if (v > m) m = v;
  return m;
}
