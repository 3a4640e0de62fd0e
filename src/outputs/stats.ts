/** Summary statistics of posterior samples. */

/**
 * Quantile of sorted values by linear interpolation between order statistics
 * (Hyndman and Fan 1996, "Sample quantiles in statistical packages", The American
 * Statistician 50(4), definition 7: the default of R and NumPy).
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export interface SampleSummary {
  mean: number;
  sd: number;
  quantiles: number[];
}

/** Mean, sd (n - 1 denominator) and the requested quantiles; sorts a copy of the values. */
export function summarizeSample(values: Float64Array, levels: readonly number[]): SampleSummary {
  const sorted = Float64Array.from(values).sort();
  return { ...meanSd(values), quantiles: levels.map((p) => quantileSorted(sorted, p)) };
}

/** As {@link summarizeSample}, for values already in ascending order (NaN last): no copy, no sort. */
export function summarizeSorted(sorted: Float64Array, levels: readonly number[]): SampleSummary {
  return { ...meanSd(sorted), quantiles: levels.map((p) => quantileSorted(sorted, p)) };
}

/** Mean and sd (n - 1 denominator; NaN for fewer than 2 values), two passes in the values' order. */
function meanSd(values: Float64Array): { mean: number; sd: number } {
  const n = values.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += values[i];
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (values[i] - mean) ** 2;
  return { mean, sd: n > 1 ? Math.sqrt(ss / (n - 1)) : NaN };
}

/** Column name of a quantile level: 0.05 -> q05, 0.5 -> q50, 0.025 -> q2.5, 0.975 -> q97.5. */
export function quantileColumn(p: number): string {
  const pct = Number((p * 100).toPrecision(10));
  return Number.isInteger(pct) ? `q${String(pct).padStart(2, '0')}` : `q${pct}`;
}
