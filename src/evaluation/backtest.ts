/**
 * Rolling-origin backtest of one prior set: at each origin the model is fitted to the data up
 * to that day only, the fit forecasts the following days exactly as `waxwane forecast` does
 * (the random walk on log beta carried on; cli/forecast.ts plans it, outputs/forecast.ts draws
 * it), and each forecast is scored against the count that was then reported.
 *
 * @remarks Rolling-origin evaluation: Tashman (2000), "Out-of-sample tests of forecasting
 * accuracy: an analysis and review", International Journal of Forecasting 16(4). Every origin
 * is scored on all its horizons, so every horizon is scored on the same number of origins.
 */
import { performance } from 'node:perf_hooks';
import { WaxwaneError } from '../errors.js';
import { planForecast } from '../cli/forecast.js';
import { fitPosterior, type SamplerOptions } from '../inference/fit.js';
import type { PriorSet } from '../model/prior-set.js';
import { forecastScenario } from '../outputs/forecast.js';
import { deriveSeed } from '../util/rng.js';
import { checkFit, pooledDraws, type FitCheck } from './fit-record.js';
import { scoreForecast, type CountScore } from './forecast-scores.js';

export interface BacktestOptions {
  /** days at the end of the data whose counts are forecast and scored (M) */
  window: number;
  /** days between origins (k) */
  every: number;
  /** days forecast from each origin (H) */
  horizon: number;
}

/** Defaults of `waxwane compare`: seven weekly origins, each forecasting two weeks. */
export const DEFAULT_BACKTEST: BacktestOptions = { window: 56, every: 7, horizon: 14 };

/** Fewest days a backtest fit may have: four weekly knots of data. */
export const MIN_TRAINING_DAYS = 28;

/**
 * The origins of a backtest: indices of the last day each fit sees. The last `window` days of
 * a series of `days` days are the test period; the first origin is the day before it, the
 * others follow every `every` days while `horizon` days of data remain after them.
 *
 * @throws WaxwaneError when the options leave no origin or too little data to fit.
 * @example backtestOrigins(182, { window: 56, every: 7, horizon: 14 }) // [125, 132, 139, 146, 153, 160, 167]
 */
export function backtestOrigins(days: number, o: BacktestOptions): number[] {
  if (o.window < o.horizon) {
    throw new WaxwaneError(`--window ${o.window} is shorter than --horizon ${o.horizon}: the test period must hold at least one whole forecast; lengthen --window or shorten --horizon`);
  }
  const first = days - 1 - o.window;
  if (first + 1 < MIN_TRAINING_DAYS) {
    throw new WaxwaneError(
      `the data have ${days} days: a backtest window of ${o.window} days leaves ${Math.max(0, first + 1)} days to fit at the first origin, fewer than ${MIN_TRAINING_DAYS}; shorten --window (at most ${days - MIN_TRAINING_DAYS}) or use a longer series`,
    );
  }
  const origins: number[] = [];
  for (let t = first; t <= days - 1 - o.horizon; t += o.every) origins.push(t);
  return origins;
}

/** The series a backtest works on. */
export interface BacktestData {
  /** daily counts from the first observed day; NaN = missing */
  counts: ArrayLike<number>;
  dates: readonly string[];
  population: number;
  firstWeekday: number;
}

export interface ScoredForecast {
  /** index of the last day the fit saw */
  origin: number;
  /** days ahead, 1..H */
  horizon: number;
  /** index of the forecast day */
  target: number;
  observed: number;
  score: CountScore;
}

export interface BacktestFit {
  origin: number;
  seconds: number;
  check: FitCheck;
  /** draws whose forecast epidemic turned impossible (left out of the scores) */
  failedDraws: number;
  draws: number;
  warnings: string[];
}

export interface BacktestResult {
  forecasts: ScoredForecast[];
  fits: BacktestFit[];
}

/** Seed stream of the backtest fits: fit j (origin j) uses deriveSeed(seed, STREAM_BACKTEST, j). */
export const STREAM_BACKTEST = 0xbac7;

export interface BacktestEvents {
  /** a fit is about to start (j of n) */
  fitStarting?(j: number, n: number, origin: number): void;
  /** the fit's chains report progress */
  progress?(chain: number, iteration: number, total: number): void;
}

/**
 * Runs the backtest of `priorSet`: one fit per origin (sampler settings `sampler`, its seed
 * replaced by deriveSeed(seed, STREAM_BACKTEST, j) for origin j, so every prior set meets the
 * same random numbers at the same origin), a forecast of `horizon` days from its draws with
 * the same seed, and the scores of every forecast day whose count is known.
 */
export async function backtestPriorSet(
  data: BacktestData,
  priorSet: PriorSet,
  origins: readonly number[],
  horizon: number,
  sampler: SamplerOptions,
  seed: number,
  events: BacktestEvents = {},
): Promise<BacktestResult> {
  const forecasts: ScoredForecast[] = [];
  const fits: BacktestFit[] = [];
  for (let j = 0; j < origins.length; j++) {
    const origin = origins[j]!;
    if (origin + horizon >= data.counts.length) throw new RangeError(`backtest origin ${origin} + horizon ${horizon} runs past the data`);
    events.fitStarting?.(j, origins.length, origin);
    const fitSeed = deriveSeed(seed, STREAM_BACKTEST, j);
    const counts = Array.from({ length: origin + 1 }, (_, t) => (Number.isNaN(data.counts[t]!) ? null : data.counts[t]!)) as number[];
    const input = { counts, population: data.population, firstWeekday: data.firstWeekday, priorSet };
    const started = performance.now();
    const fit = await fitPosterior(input, { ...sampler, seed: fitSeed }, { progress: (c, i, total) => events.progress?.(c, i, total) }).catch((e: unknown) => {
      if (!(e instanceof WaxwaneError)) throw e;
      throw new WaxwaneError(`prior set ${priorSet.name}, backtest fit up to ${data.dates[origin]}: ${e.message}`, e.exitCode);
    });
    const draws = pooledDraws(fit);
    const plan = planForecast({ horizon, hold: false }, data.dates[0]!, data.dates[origin]!, priorSet.model);
    const carryOn = plan.resolved[0]!;
    const forecast = forecastScenario(fit.model, draws, data.firstWeekday, horizon, carryOn.beta, fitSeed);
    const observed = Array.from({ length: horizon }, (_, h) => data.counts[origin + 1 + h]!);
    const scores = scoreForecast(fit.model, draws, forecast, observed);
    scores.forEach((score, h) => {
      if (score !== null) forecasts.push({ origin, horizon: h + 1, target: origin + 1 + h, observed: observed[h]!, score });
    });
    fits.push({
      origin,
      seconds: (performance.now() - started) / 1000,
      check: checkFit(fit),
      failedDraws: forecast.failed,
      draws: forecast.draws,
      warnings: fit.warnings,
    });
  }
  return { forecasts, fits };
}
