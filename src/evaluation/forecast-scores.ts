/**
 * Every score of one count forecast made of posterior draws: the weighted interval score and
 * the CRPS of the predicted counts, the log score of the draws' negative-binomial mixture, and
 * whether the outcome falls in the central 50% and 90% prediction intervals.
 */
import type { EpidemicModel } from '../model/posterior.js';
import type { ScenarioForecast } from '../outputs/forecast.js';
import { centralInterval, inside } from './coverage.js';
import { crpsSorted } from './crps.js';
import { wisFromSorted } from './interval-score.js';
import { negBinMixtureLogScore } from './log-score.js';
import { quantileSorted } from '../outputs/stats.js';

/** Quantile levels kept beside each scored forecast (backtest.csv). */
export const FORECAST_LEVELS = [0.05, 0.25, 0.5, 0.75, 0.95] as const;

export interface CountScore {
  wis: number;
  crps: number;
  /** -ln p(y) of the negative-binomial mixture */
  logScore: number;
  /** 1 if the outcome lies in the central 50% interval, else 0 */
  in50: number;
  /** 1 if the outcome lies in the central 90% interval, else 0 */
  in90: number;
  /** mean of the predicted counts */
  mean: number;
  /** predicted counts at {@link FORECAST_LEVELS} */
  quantiles: number[];
}

/**
 * Scores the forecast of one count y. `predicted` holds one predicted count per draw (the
 * posterior predictive: a negative-binomial draw around the draw's mean), `mu` and `phi` the
 * draws' expected count and dispersion; NaN entries (failed draws) are left out. WIS, CRPS and
 * coverage are computed from the predicted counts, the log score from the mixture of the
 * draws' negative binomials (exact for the draws).
 */
export function scoreCount(y: number, predicted: ArrayLike<number>, mu: ArrayLike<number>, phi: ArrayLike<number>): CountScore {
  const kept: number[] = [];
  for (let d = 0; d < predicted.length; d++) if (!Number.isNaN(predicted[d])) kept.push(predicted[d]);
  const sorted = Float64Array.from(kept).sort();
  let sum = 0;
  for (const v of sorted) sum += v;
  const [lo50, hi50] = centralInterval(sorted, 0.5);
  const [lo90, hi90] = centralInterval(sorted, 0.9);
  return {
    wis: wisFromSorted(sorted, y),
    crps: crpsSorted(sorted, y),
    logScore: negBinMixtureLogScore(y, mu, phi),
    in50: inside(y, lo50, hi50),
    in90: inside(y, lo90, hi90),
    mean: sorted.length === 0 ? NaN : sum / sorted.length,
    quantiles: FORECAST_LEVELS.map((p) => quantileSorted(sorted, p)),
  };
}

/**
 * Scores each horizon of a forecast (outputs/forecast.ts) against the outcomes that followed:
 * `observed[h]` is the count on forecast day h + 1 (NaN: a missing day, left unscored, its
 * entry null). `draws` are the draws the forecast was made from (for each draw's dispersion).
 */
export function scoreForecast(model: EpidemicModel, draws: Float64Array, forecast: ScenarioForecast, observed: ArrayLike<number>): Array<CountScore | null> {
  const dim = model.layout.dim;
  const n = forecast.draws;
  const H = forecast.horizon;
  const phi = new Float64Array(n);
  for (let d = 0; d < n; d++) phi[d] = Math.exp(draws[d * dim + model.layout.dispersion]);
  const predicted = new Float64Array(n);
  const mu = new Float64Array(n);
  const out: Array<CountScore | null> = [];
  for (let h = 0; h < H; h++) {
    const y = observed[h];
    if (Number.isNaN(y)) {
      out.push(null);
      continue;
    }
    for (let d = 0; d < n; d++) {
      predicted[d] = forecast.daily.predicted_reports[d * H + h];
      mu[d] = forecast.daily.expected_reports[d * H + h];
    }
    out.push(scoreCount(y, predicted, mu, phi));
  }
  return out;
}
