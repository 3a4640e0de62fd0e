/**
 * From the rows of a long-form summary table to what the charts draw: for each day the
 * median and the outer and inner intervals given by the table's own quantile levels (the
 * defaults 0.05, 0.25, 0.5, 0.75, 0.95 give the 90% and 50% intervals; other `--quantiles`
 * choices give other bands, named accordingly).
 */
import type { FanPoint } from './charts/fan.js';
import { intervalName, num } from './html.js';
import type { QuantileRow, QuantileTable } from './run-folder.js';

export interface BandLevels {
  /** index into `q` of the lower and upper outer quantile */
  outer: [number, number];
  /** inner interval, when the table has one inside the outer */
  inner: [number, number] | null;
  /** index of the median, or -1: the mean is drawn instead */
  mid: number;
  outerName: string;
  innerName: string | null;
  midName: string;
}

/** Which quantile columns make the bands of a table. */
export function bandLevels(levels: readonly number[]): BandLevels {
  const n = levels.length;
  const mid = levels.findIndex((p) => Math.abs(p - 0.5) < 1e-12);
  const outer: [number, number] = [0, n - 1];
  const inner: [number, number] | null = n >= 4 && levels[1] < 0.5 && levels[n - 2] > 0.5 ? [1, n - 2] : null;
  return {
    outer,
    inner,
    mid,
    outerName: intervalName(levels[0], levels[n - 1]),
    innerName: inner === null ? null : intervalName(levels[inner[0]], levels[inner[1]]),
    midName: mid >= 0 ? 'median' : 'mean',
  };
}

/** A row as a fan-chart point. */
export function fanPoint(row: QuantileRow, b: BandLevels): FanPoint {
  return {
    date: row.date,
    mid: b.mid >= 0 ? row.q[b.mid] : row.mean,
    outerLo: row.q[b.outer[0]],
    outerHi: row.q[b.outer[1]],
    innerLo: b.inner === null ? null : row.q[b.inner[0]],
    innerHi: b.inner === null ? null : row.q[b.inner[1]],
  };
}

/** The dated rows of one quantity (and scenario, for forecast.csv), in date order. */
export function quantityRows(table: QuantileTable, quantity: string, scenario?: string): QuantileRow[] {
  return table.rows
    .filter((r) => r.quantity === quantity && r.date !== '' && (scenario === undefined || r.scenario === scenario))
    .sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0));
}

/** The fan-chart points of one quantity. */
export function fanSeries(table: QuantileTable, quantity: string, scenario?: string): FanPoint[] {
  const b = bandLevels(table.levels);
  return quantityRows(table, quantity, scenario).map((r) => fanPoint(r, b));
}

/** The undated row of a parameter, or undefined. */
export function parameterRow(table: QuantileTable, parameter: string): QuantileRow | undefined {
  return table.rows.find((r) => r.quantity === parameter && r.date === '');
}

/** The last dated row of a quantity, or undefined. */
export function lastRow(table: QuantileTable, quantity: string): QuantileRow | undefined {
  return quantityRows(table, quantity).at(-1);
}

/** "median [lo, hi]" of a row with the table's outer interval. */
export function rowInterval(table: QuantileTable, row: QuantileRow | undefined, digits = 3): string {
  if (row === undefined) return 'n/a';
  const b = bandLevels(table.levels);
  return `${num(b.mid >= 0 ? row.q[b.mid] : row.mean, digits)} [${num(row.q[b.outer[0]], digits)}, ${num(row.q[b.outer[1]], digits)}]`;
}
