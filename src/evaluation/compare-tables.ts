/**
 * The tables `waxwane compare` writes: scores.csv (mean scores by horizon and overall),
 * ranking.csv, backtest.csv (every scored forecast), estimates.csv (posterior summaries of key
 * quantities under each prior set), identification.csv (shift and contraction of each
 * parameter) and fits.csv (every fit run, with its convergence).
 */
import type { Identification } from '../outputs/identification.js';
import { formatNumber, toCsv } from '../outputs/format.js';
import { quantileColumn } from '../outputs/stats.js';
import type { BacktestFit, ScoredForecast } from './backtest.js';
import type { PairedDifference, RankedPriorSet, ScoreSummary } from './comparison.js';
import { FORECAST_LEVELS } from './forecast-scores.js';
import type { FitCheck } from './fit-record.js';

const f = (x: number, digits = 6) => formatNumber(x, digits);

export const SCORE_COLUMNS = ['prior_set', 'horizon', 'forecasts', 'wis', 'crps', 'log_score', 'coverage_50', 'coverage_90'] as const;

function scoreFields(s: ScoreSummary): string[] {
  return [String(s.forecasts), f(s.wis), f(s.crps), f(s.logScore), f(s.coverage50, 4), f(s.coverage90, 4)];
}

/** scores.csv: for each prior set, one row per horizon (1..H) and a row `all`. */
export function scoresCsv(entries: ReadonlyArray<{ label: string; byHorizon: readonly ScoreSummary[]; overall: ScoreSummary }>): string {
  const rows: string[][] = [];
  for (const e of entries) {
    e.byHorizon.forEach((s, i) => rows.push([e.label, String(i + 1), ...scoreFields(s)]));
    rows.push([e.label, 'all', ...scoreFields(e.overall)]);
  }
  return toCsv(SCORE_COLUMNS, rows);
}

export const RANKING_COLUMNS = [
  'rank',
  'prior_set',
  'wis',
  'relative_wis',
  'wis_vs_best',
  'wis_vs_best_se',
  'crps',
  'log_score',
  'coverage_50',
  'coverage_90',
  'rank_crps',
  'rank_log_score',
] as const;

/** ranking.csv: one row per prior set, best first. */
export function rankingCsv(ranking: readonly RankedPriorSet[], versusBest: ReadonlyMap<string, PairedDifference>): string {
  return toCsv(
    RANKING_COLUMNS,
    ranking.map((r) => {
      const d = versusBest.get(r.label);
      return [
        String(r.rank),
        r.label,
        f(r.overall.wis),
        f(r.relativeWis, 4),
        f(d?.mean ?? NaN),
        f(d?.se ?? NaN),
        f(r.overall.crps),
        f(r.overall.logScore),
        f(r.overall.coverage50, 4),
        f(r.overall.coverage90, 4),
        String(r.rankCrps),
        String(r.rankLogScore),
      ];
    }),
  );
}

export const BACKTEST_COLUMNS = [
  'prior_set',
  'origin',
  'date',
  'horizon',
  'observed',
  'mean',
  ...FORECAST_LEVELS.map(quantileColumn),
  'wis',
  'crps',
  'log_score',
  'in_50',
  'in_90',
] as const;

/** backtest.csv: every scored forecast (origin = the last date the fit saw). */
export function backtestCsv(entries: ReadonlyArray<{ label: string; forecasts: readonly ScoredForecast[] }>, dates: readonly string[]): string {
  const rows: string[][] = [];
  for (const e of entries) {
    for (const x of e.forecasts) {
      const s = x.score;
      rows.push([
        e.label,
        dates[x.origin]!,
        dates[x.target]!,
        String(x.horizon),
        String(x.observed),
        f(s.mean),
        ...s.quantiles.map((q) => f(q)),
        f(s.wis),
        f(s.crps),
        f(s.logScore),
        String(s.in50),
        String(s.in90),
      ]);
    }
  }
  return toCsv(BACKTEST_COLUMNS, rows);
}

export const IDENTIFICATION_COLUMNS = ['prior_set', 'parameter', 'prior_sd', 'posterior_sd', 'contraction', 'shift', 'weak'] as const;

/** identification.csv: how far each parameter's posterior moved from its prior, and how much narrower it is. */
export function identificationCsv(entries: ReadonlyArray<{ label: string; identification: readonly Identification[] }>): string {
  const rows: string[][] = [];
  for (const e of entries) {
    for (const i of e.identification) rows.push([e.label, i.parameter, f(i.priorSd), f(i.posteriorSd), f(i.contraction), f(i.shift), i.weak ? 'yes' : 'no']);
  }
  return toCsv(IDENTIFICATION_COLUMNS, rows);
}

export const FITS_COLUMNS = ['prior_set', 'fit', 'last_date', 'days', 'seconds', 'max_rhat', 'min_ess_bulk', 'min_ess_tail', 'converged', 'failed_forecast_draws'] as const;

export interface FitRow {
  label: string;
  /** 'all' (the fit on every day) or 'backtest' */
  fit: 'all' | 'backtest';
  lastDate: string;
  days: number;
  seconds: number;
  check: FitCheck;
  /** forecast draws whose epidemic turned impossible; empty for the fit on every day */
  failedForecastDraws: number | null;
}

/** fits.csv: every fit compare ran, with its convergence diagnostics. */
export function fitsCsv(rows: readonly FitRow[]): string {
  return toCsv(
    FITS_COLUMNS,
    rows.map((r) => [
      r.label,
      r.fit,
      r.lastDate,
      String(r.days),
      f(r.seconds, 4),
      f(r.check.maxRhat, 5),
      f(r.check.minEssBulk, 5),
      f(r.check.minEssTail, 5),
      r.check.converged ? 'yes' : 'no',
      r.failedForecastDraws === null ? '' : String(r.failedForecastDraws),
    ]),
  );
}

/** Fits of a backtest as fits.csv rows. */
export function backtestFitRows(label: string, fits: readonly BacktestFit[], dates: readonly string[]): FitRow[] {
  return fits.map((x) => ({ label, fit: 'backtest', lastDate: dates[x.origin]!, days: x.origin + 1, seconds: x.seconds, check: x.check, failedForecastDraws: x.failedDraws }));
}
