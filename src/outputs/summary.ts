/**
 * The tables a fit writes: summary.csv (long form: quantity, date, mean, sd, quantiles),
 * diagnostics.csv (one row per sampled parameter) and draws.csv (every kept draw).
 */
import type { ParameterLayout } from '../model/layout.js';
import { naturalValue } from '../model/layout.js';
import { summarizeDiagnostics } from '../inference/diagnostics/index.js';
import { DAILY_QUANTITIES, type SortedDailyColumns } from '../model/derived.js';
import { formatNumber, toCsv } from './format.js';
import { quantileColumn, summarizeSample, summarizeSorted } from './stats.js';

export const DEFAULT_LEVELS = [0.05, 0.25, 0.5, 0.75, 0.95] as const;

/** Draws of parameter i in natural units, one array per chain. */
export function parameterChains(layout: ParameterLayout, chains: Float64Array[], i: number): Float64Array[] {
  const dim = layout.dim;
  return chains.map((draws) => {
    const n = draws.length / dim;
    const out = new Float64Array(n);
    for (let k = 0; k < n; k++) out[k] = naturalValue(layout, i, draws[k * dim + i]);
    return out;
  });
}

export interface SummaryRow {
  quantity: string;
  date: string;
  mean: number;
  sd: number;
  quantiles: number[];
}

export function summaryRows(
  layout: ParameterLayout,
  chains: Float64Array[],
  daily: SortedDailyColumns,
  dates: readonly string[],
  levels: readonly number[],
): SummaryRow[] {
  const rows: SummaryRow[] = [];
  const T = dates.length;
  for (const q of DAILY_QUANTITIES) {
    const m = daily[q];
    const n = m.length / T;
    for (let t = 0; t < T; t++) rows.push({ quantity: q, date: dates[t], ...summarizeSorted(m.subarray(t * n, (t + 1) * n), levels) });
  }
  for (let i = 0; i < layout.dim; i++) {
    const all = concat(parameterChains(layout, chains, i));
    rows.push({ quantity: layout.names[i], date: '', ...summarizeSample(all, levels) });
  }
  return rows;
}

export function summaryCsv(rows: readonly SummaryRow[], levels: readonly number[]): string {
  return toCsv(
    ['quantity', 'date', 'mean', 'sd', ...levels.map(quantileColumn)],
    rows.map((r) => [r.quantity, r.date, formatNumber(r.mean), formatNumber(r.sd), ...r.quantiles.map((v) => formatNumber(v))]),
  );
}

export interface DiagnosticRow {
  parameter: string;
  rhat: number;
  ess_bulk: number;
  ess_tail: number;
  mcse_mean: number;
}

export function diagnosticRows(layout: ParameterLayout, chains: Float64Array[]): DiagnosticRow[] {
  const rows: DiagnosticRow[] = [];
  for (let i = 0; i < layout.dim; i++) {
    const d = summarizeDiagnostics(parameterChains(layout, chains, i));
    rows.push({ parameter: layout.names[i], rhat: d.rhat, ess_bulk: d.essBulk, ess_tail: d.essTail, mcse_mean: d.mcseMean });
  }
  return rows;
}

export function diagnosticsCsv(rows: readonly DiagnosticRow[]): string {
  return toCsv(
    ['parameter', 'rhat', 'ess_bulk', 'ess_tail', 'mcse_mean'],
    rows.map((r) => [r.parameter, formatNumber(r.rhat, 6), formatNumber(r.ess_bulk, 6), formatNumber(r.ess_tail, 6), formatNumber(r.mcse_mean, 6)]),
  );
}

/** Every kept draw in natural units: chain, draw, log_density, then one column per parameter. */
export function drawsCsv(layout: ParameterLayout, chains: Float64Array[], logDensity: Float64Array[]): string {
  const rows: string[][] = [];
  const dim = layout.dim;
  chains.forEach((draws, c) => {
    const n = draws.length / dim;
    for (let k = 0; k < n; k++) {
      const row = [String(c + 1), String(k + 1), formatNumber(logDensity[c][k], 12)];
      for (let i = 0; i < dim; i++) row.push(formatNumber(naturalValue(layout, i, draws[k * dim + i]), 12));
      rows.push(row);
    }
  });
  return toCsv(['chain', 'draw', 'log_density', ...layout.names], rows);
}

/** The convergence rule of MODEL.md section 7. */
export const CONVERGENCE = { maxRhat: 1.01, minEss: 400 } as const;

export function isConverged(rows: readonly DiagnosticRow[]): boolean {
  return rows.every(
    (r) => r.rhat <= CONVERGENCE.maxRhat && r.ess_bulk >= CONVERGENCE.minEss && r.ess_tail >= CONVERGENCE.minEss,
  );
}

function concat(parts: Float64Array[]): Float64Array {
  const out = new Float64Array(parts.reduce((a, p) => a + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}
