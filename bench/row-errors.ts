// How far one row is from a reference row over bins [from, to): the worst |Δ| as a share of the reference's peak, the
// summed |Δ| over the summed reference, and the ratio of the sums (the canting benchmarks' and tests' figures).

export function rowErrors(row: ArrayLike<number>, reference: ArrayLike<number>, from: number, to: number): { worst: number; summed: number; ratio: number } {
  let peak = 0;
  for (let j = from; j < to; j++) peak = Math.max(peak, reference[j]);
  let worst = 0;
  let summed = 0;
  let total = 0;
  let sum = 0;
  for (let j = from; j < to; j++) {
    worst = Math.max(worst, Math.abs(row[j] - reference[j]) / peak);
    summed += Math.abs(row[j] - reference[j]);
    total += reference[j];
    sum += row[j];
  }
  return { worst, summed: summed / total, ratio: sum / total };
}
