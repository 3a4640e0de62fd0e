/**
 * Summaries of per-draw values that may hold infinities (a doubling time is infinite for a
 * draw that does not grow) or NaN for draws whose trajectory failed, and the long-form tables
 * of the forecast outputs.
 */
import { formatNumber, toCsv } from './format.js';
import { quantileColumn, summarizeSample, type SampleSummary } from './stats.js';

/**
 * Type-7 quantile of sorted values (Hyndman and Fan 1996, definition 7, as in stats.ts) that
 * stays exact next to infinities: an order statistic is returned as it is, and a value between
 * a finite one and +Infinity is +Infinity (the plain formula would give 0 * Infinity = NaN).
 */
export function quantileSortedExtended(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  const a = sorted[lo];
  const b = sorted[hi];
  if (h === lo || a === b) return a;
  return a + (h - lo) * (b - a);
}

/**
 * Mean, sd and quantiles of the values that are not NaN (NaN marks a draw without a result).
 * With an infinite value the mean is infinite and the sd NaN; quantiles stay exact (see
 * {@link quantileSortedExtended}). All NaN (or no values) gives NaN everywhere.
 */
export function summarizeDraws(values: Float64Array, levels: readonly number[]): SampleSummary {
  let kept = values;
  if (values.some((v) => Number.isNaN(v))) kept = values.filter((v) => !Number.isNaN(v));
  if (kept.length === 0) return { mean: NaN, sd: NaN, quantiles: levels.map(() => NaN) };
  if (kept.every((v) => Number.isFinite(v))) return summarizeSample(kept, levels);
  const sorted = Float64Array.from(kept).sort();
  let sum = 0;
  for (const v of kept) sum += v;
  return { mean: sum / kept.length, sd: NaN, quantiles: levels.map((p) => quantileSortedExtended(sorted, p)) };
}

/** Column j of a draws x columns row-major matrix. */
export function column(matrix: Float64Array, columns: number, j: number, out = new Float64Array(matrix.length / columns)): Float64Array {
  for (let d = 0; d < out.length; d++) out[d] = matrix[d * columns + j];
  return out;
}

export interface LongRow {
  /** leading text fields (scenario, quantity, date, ...) */
  keys: string[];
  summary: SampleSummary;
}

/** A long-form CSV: the key columns, then mean, sd and one column per quantile level. */
export function longCsv(keyColumns: readonly string[], rows: readonly LongRow[], levels: readonly number[]): string {
  return toCsv(
    [...keyColumns, 'mean', 'sd', ...levels.map(quantileColumn)],
    rows.map((r) => [...r.keys, formatNumber(r.summary.mean), formatNumber(r.summary.sd), ...r.summary.quantiles.map((v) => formatNumber(v))]),
  );
}

/** Doubling time ln 2 / r of a growing draw; Infinity for a draw that does not grow; NaN stays NaN. */
export function doublingOf(r: number): number {
  return r > 0 ? Math.LN2 / r : Number.isNaN(r) ? NaN : Infinity;
}

/** Halving time ln 2 / |r| of a declining draw; Infinity for a draw that does not decline; NaN stays NaN. */
export function halvingOf(r: number): number {
  return r < 0 ? Math.LN2 / -r : Number.isNaN(r) ? NaN : Infinity;
}
