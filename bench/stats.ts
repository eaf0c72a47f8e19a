// Order statistics of repeated timings: the median (of an even count, the mean of the two middle values) and the
// quartiles by linear interpolation between order statistics (Hyndman & Fan 1996, definition 7, R's default).

/** The q-quantile (0 ≤ q ≤ 1) of values, interpolating linearly between the order statistics. */
export function quantile(values: readonly number[], q: number): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const at = q * (sorted.length - 1);
  const below = Math.floor(at);
  const above = Math.min(sorted.length - 1, below + 1);
  return sorted[below] + (at - below) * (sorted[above] - sorted[below]);
}

export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}

export interface Spread {
  median: number;
  /** First and third quartiles. */
  q1: number;
  q3: number;
  min: number;
  max: number;
  n: number;
}

export function spread(values: readonly number[]): Spread {
  return {
    median: median(values),
    q1: quantile(values, 0.25),
    q3: quantile(values, 0.75),
    min: Math.min(...values),
    max: Math.max(...values),
    n: values.length,
  };
}

/** A relative spread as a percentage: "+1.2 % (quartiles −0.4 to +2.9 %, range −3.0 to +6.1 %, n = 60)". */
export function percentSpread(s: Spread): string {
  const pc = (v: number) => `${v >= 0 ? "+" : "−"}${Math.abs(100 * v).toFixed(1)}`;
  return `${pc(s.median)} % (quartiles ${pc(s.q1)} to ${pc(s.q3)} %, range ${pc(s.min)} to ${pc(s.max)} %, n = ${s.n})`;
}
