/** Row-major 3×3 matrix, named destination-from-source where used. */
export type Matrix3 = readonly [number, number, number, number, number, number, number, number, number];

export function multiplyMatrix3(a: Matrix3, b: Matrix3): Matrix3 {
  const m = new Array<number>(9);
  for (let r = 0; r < 3; r++) {
    for (let c = 0; c < 3; c++) m[3 * r + c] = a[3 * r] * b[c] + a[3 * r + 1] * b[3 + c] + a[3 * r + 2] * b[6 + c];
  }
  return m as unknown as Matrix3;
}

/** Apply a matrix to interleaved triples, returning a new array. */
export function applyMatrix3(m: Matrix3, triples: Float64Array): Float64Array {
  const out = new Float64Array(triples.length);
  for (let i = 0; i < triples.length; i += 3) {
    const a = triples[i];
    const b = triples[i + 1];
    const c = triples[i + 2];
    out[i] = m[0] * a + m[1] * b + m[2] * c;
    out[i + 1] = m[3] * a + m[4] * b + m[5] * c;
    out[i + 2] = m[6] * a + m[7] * b + m[8] * c;
  }
  return out;
}

export function fromRows(rows: readonly (readonly number[])[]): Matrix3 {
  return [rows[0][0], rows[0][1], rows[0][2], rows[1][0], rows[1][1], rows[1][2], rows[2][0], rows[2][1], rows[2][2]];
}
