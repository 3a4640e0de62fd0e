/**
 * Scores of a backtest averaged by horizon and overall, and the ranking of prior sets by them.
 */
import type { ScoredForecast } from './backtest.js';
import { coverage } from './coverage.js';

export interface ScoreSummary {
  /** forecasts averaged */
  forecasts: number;
  wis: number;
  crps: number;
  logScore: number;
  /** share of outcomes inside the central 50% interval */
  coverage50: number;
  coverage90: number;
}

/** Means of the scores of `forecasts` (NaN everywhere when there are none). */
export function summarizeScores(forecasts: readonly ScoredForecast[]): ScoreSummary {
  const n = forecasts.length;
  const mean = (pick: (f: ScoredForecast) => number) => (n === 0 ? NaN : forecasts.reduce((a, f) => a + pick(f), 0) / n);
  return {
    forecasts: n,
    wis: mean((f) => f.score.wis),
    crps: mean((f) => f.score.crps),
    logScore: mean((f) => f.score.logScore),
    coverage50: coverage(forecasts.map((f) => f.score.in50)),
    coverage90: coverage(forecasts.map((f) => f.score.in90)),
  };
}

/** Score summaries for horizons 1..H (index h - 1). */
export function summarizeByHorizon(forecasts: readonly ScoredForecast[], horizon: number): ScoreSummary[] {
  return Array.from({ length: horizon }, (_, i) => summarizeScores(forecasts.filter((f) => f.horizon === i + 1)));
}

export interface RankedPriorSet {
  /** 1 = best by the mean weighted interval score */
  rank: number;
  label: string;
  overall: ScoreSummary;
  /** mean WIS over that of the best prior set (1 for the best) */
  relativeWis: number;
  /** rank by the mean CRPS alone */
  rankCrps: number;
  /** rank by the mean log score alone */
  rankLogScore: number;
}

/** Ascending order of numbers with NaN last. */
function ascending(a: number, b: number): number {
  if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) ? (Number.isNaN(b) ? 0 : 1) : -1;
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Positions (1-based) of the items sorted by `keys` in turn, ties kept in input order. */
function ranksBy<T>(items: readonly T[], ...keys: Array<(t: T) => number>): number[] {
  const order = items
    .map((_, i) => i)
    .sort((a, b) => {
      for (const key of keys) {
        const c = ascending(key(items[a]!), key(items[b]!));
        if (c !== 0) return c;
      }
      return a - b;
    });
  const ranks = new Array<number>(items.length);
  order.forEach((i, pos) => {
    ranks[i] = pos + 1;
  });
  return ranks;
}

/**
 * Ranks prior sets by their mean weighted interval score over every scored forecast (lower is
 * better), ties broken by the mean CRPS and then by the order given. The ranks by the CRPS and
 * by the log score alone are kept beside it: the three are proper scores (Gneiting and Raftery
 * 2007) that weigh errors differently (the log score punishes a forecast that gave the outcome
 * almost no probability far more), so when they disagree the choice is not clear-cut.
 */
export function rankPriorSets(entries: ReadonlyArray<{ label: string; overall: ScoreSummary }>): RankedPriorSet[] {
  const ranks = ranksBy(entries, (e) => e.overall.wis, (e) => e.overall.crps);
  const crpsRanks = ranksBy(entries, (e) => e.overall.crps);
  const logRanks = ranksBy(entries, (e) => e.overall.logScore);
  const best = Math.min(...entries.map((e) => e.overall.wis).filter((v) => !Number.isNaN(v)));
  return entries
    .map((e, i) => ({
      rank: ranks[i]!,
      label: e.label,
      overall: e.overall,
      relativeWis: e.overall.wis / best,
      rankCrps: crpsRanks[i]!,
      rankLogScore: logRanks[i]!,
    }))
    .sort((a, b) => a.rank - b.rank);
}

export interface PairedDifference {
  /** mean over origins of the per-origin mean score difference (this minus the reference) */
  mean: number;
  /** its standard error over origins (NaN with fewer than two origins) */
  se: number;
  origins: number;
}

/**
 * Mean paired difference of the weighted interval scores of two backtests on the same
 * forecasts (matched by origin and horizon), with a standard error that treats origins as
 * independent: the differences are first averaged within each origin, because the horizons of
 * one origin share a fit and their errors are strongly correlated.
 *
 * @remarks A simplified Diebold-Mariano comparison (Diebold and Mariano 1995, "Comparing
 * predictive accuracy", Journal of Business and Economic Statistics 13(3)): the loss
 * differential's mean and its standard error, here with origin means in place of a
 * long-run variance. With few origins the standard error is rough; a difference within about
 * two of them is no clear difference.
 */
export function pairedWisDifference(a: readonly ScoredForecast[], reference: readonly ScoredForecast[]): PairedDifference {
  const ref = new Map(reference.map((f) => [`${f.origin}:${f.horizon}`, f.score.wis]));
  const byOrigin = new Map<number, { sum: number; n: number }>();
  for (const f of a) {
    const r = ref.get(`${f.origin}:${f.horizon}`);
    if (r === undefined) continue;
    const cell = byOrigin.get(f.origin) ?? { sum: 0, n: 0 };
    cell.sum += f.score.wis - r;
    cell.n++;
    byOrigin.set(f.origin, cell);
  }
  const means = [...byOrigin.values()].map((c) => c.sum / c.n);
  const k = means.length;
  if (k === 0) return { mean: NaN, se: NaN, origins: 0 };
  const mean = means.reduce((s, v) => s + v, 0) / k;
  const variance = k > 1 ? means.reduce((s, v) => s + (v - mean) ** 2, 0) / (k - 1) : NaN;
  return { mean, se: Math.sqrt(variance / k), origins: k };
}
