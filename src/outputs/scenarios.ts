/**
 * Scenarios side by side (scenarios.csv): per scenario the peak of reported cases and of
 * infections over the forecast days (when and how high), the infections and reports over the
 * whole horizon, and against the first scenario the infections averted, each summarised over
 * the draws. Differences are taken draw by draw: every scenario of a run uses the same draws and
 * the same random numbers, so a difference reflects the scenarios alone.
 */
import { addDays } from '../io/dates.js';
import { formatNumber, toCsv } from './format.js';
import { quantileColumn } from './stats.js';
import { summarizeDraws } from './draw-summary.js';
import type { ScenarioTotals } from './forecast.js';
import type { SampleSummary } from './stats.js';

/** Quantities of scenarios.csv; the `_day` ones also carry dates. */
export const SCENARIO_QUANTITIES = [
  'peak_reports_day',
  'peak_reports',
  'peak_infections_day',
  'peak_infections',
  'cumulative_infections',
  'cumulative_reports',
  'averted_infections',
  'averted_share',
] as const;
export type ScenarioQuantity = (typeof SCENARIO_QUANTITIES)[number];

export interface ScenarioRow {
  scenario: string;
  quantity: ScenarioQuantity;
  summary: SampleSummary;
  /** for the `_day` quantities: the date of each quantile (rounded to a whole day); else null */
  dates: string[] | null;
}

export interface NamedTotals {
  name: string;
  totals: ScenarioTotals;
}

/**
 * The rows of scenarios.csv. `lastDate` is the last observed day (forecast day 1 is the day
 * after it). The first scenario is the reference: averted_infections = its cumulative
 * infections minus the scenario's, averted_share = that over its cumulative infections.
 */
export function scenarioRows(scenarios: readonly NamedTotals[], lastDate: string, levels: readonly number[]): ScenarioRow[] {
  const rows: ScenarioRow[] = [];
  const ref = scenarios[0]!.totals;
  const n = ref.cumulativeInfections.length;
  for (const [i, { name, totals }] of scenarios.entries()) {
    const add = (quantity: ScenarioQuantity, values: Float64Array) => {
      const summary = summarizeDraws(values, levels);
      const dates = quantity.endsWith('_day')
        ? summary.quantiles.map((q) => (Number.isFinite(q) ? addDays(lastDate, Math.round(q)) : ''))
        : null;
      rows.push({ scenario: name, quantity, summary, dates });
    };
    add('peak_reports_day', totals.peakReportsDay);
    add('peak_reports', totals.peakReports);
    add('peak_infections_day', totals.peakInfectionsDay);
    add('peak_infections', totals.peakInfections);
    add('cumulative_infections', totals.cumulativeInfections);
    add('cumulative_reports', totals.cumulativeReports);
    if (i > 0) {
      const averted = new Float64Array(n);
      const share = new Float64Array(n);
      for (let d = 0; d < n; d++) {
        averted[d] = ref.cumulativeInfections[d] - totals.cumulativeInfections[d];
        share[d] = averted[d] / ref.cumulativeInfections[d];
      }
      add('averted_infections', averted);
      add('averted_share', share);
    }
  }
  return rows;
}

/**
 * scenarios.csv: `scenario,quantity,mean,sd,<quantiles>,date_<quantiles>`; the date columns
 * are filled on the `_day` rows only.
 */
export function scenariosCsv(rows: readonly ScenarioRow[], levels: readonly number[]): string {
  const q = levels.map(quantileColumn);
  return toCsv(
    ['scenario', 'quantity', 'mean', 'sd', ...q, ...q.map((c) => `date_${c}`)],
    rows.map((r) => [
      r.scenario,
      r.quantity,
      formatNumber(r.summary.mean),
      formatNumber(r.summary.sd),
      ...r.summary.quantiles.map((v) => formatNumber(v)),
      ...(r.dates ?? levels.map(() => '')),
    ]),
  );
}

/** Share of draws whose value equals `day` (e.g. a peak on the last forecast day), NaN draws left out. */
export function shareAt(values: Float64Array, day: number): number {
  let hit = 0;
  let kept = 0;
  for (const v of values) {
    if (Number.isNaN(v)) continue;
    kept++;
    if (v === day) hit++;
  }
  return kept === 0 ? NaN : hit / kept;
}
