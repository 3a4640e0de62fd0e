/**
 * Interval and weighted interval scores of a predictive distribution given by quantiles
 * (Bracher, Ray, Gneiting and Reich 2021, "Evaluating epidemic forecasts in an interval
 * format", PLoS Computational Biology 17(2): e1008618).
 */
import { quantileSorted } from '../outputs/stats.js';

/**
 * Interval score of the central (1 - alpha) interval [lower, upper] at the outcome y: its
 * width plus 2/alpha times the distance by which y falls outside it. Lower is better.
 *
 * @remarks IS_alpha(F, y) = (u - l) + (2/alpha)(l - y) 1{y < l} + (2/alpha)(y - u) 1{y > u}
 * (Bracher et al. 2021, equation 1; Gneiting and Raftery 2007, section 6.2).
 *
 * @example intervalScore(8, 13, 22, 0.5) === 41  // width 5, plus 4 x 9 above the upper end
 */
export function intervalScore(lower: number, upper: number, y: number, alpha: number): number {
  let s = upper - lower;
  if (y < lower) s += (2 / alpha) * (lower - y);
  else if (y > upper) s += (2 / alpha) * (y - upper);
  return s;
}

/** A central (1 - alpha) prediction interval. */
export interface CentralInterval {
  alpha: number;
  lower: number;
  upper: number;
}

/**
 * Weighted interval score of a forecast given by its median and K central intervals, at the
 * outcome y. Lower is better, in the units of the outcome.
 *
 * @remarks
 * WIS = (1 / (K + 1/2)) (w_0 |y - m| + sum_k w_k IS_{alpha_k}(F, y)), w_0 = 1/2,
 * w_k = alpha_k / 2 (Bracher et al. 2021, equation 2). With these weights the WIS is the mean
 * of the 2K + 1 quantile scores 2 (1{y <= q_tau} - tau)(q_tau - y), and so approaches the CRPS
 * (the integral of the quantile score over tau) as the levels fill (0, 1) (Bracher et al. 2021,
 * section 2.2).
 *
 * @example weightedIntervalScore(10, [{ alpha: 0.5, lower: 8, upper: 13 }, { alpha: 0.1, lower: 5, upper: 20 }], 22) === 7.6
 */
export function weightedIntervalScore(median: number, intervals: readonly CentralInterval[], y: number): number {
  let s = 0.5 * Math.abs(y - median);
  for (const { alpha, lower, upper } of intervals) s += (alpha / 2) * intervalScore(lower, upper, y, alpha);
  return s / (intervals.length + 0.5);
}

/**
 * The interval levels of the weighted interval score: alpha = 0.02, 0.05, 0.1, 0.2, ..., 0.9,
 * i.e. the median and 23 quantiles, the set Bracher et al. (2021, section 2.2) use for
 * forecasts submitted to forecast hubs.
 */
export const WIS_ALPHAS: readonly number[] = [0.02, 0.05, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9];

/**
 * Weighted interval score of the predictive distribution given by sorted samples: its median
 * and central intervals taken as sample quantiles (type 7, outputs/stats.ts) at each alpha.
 */
export function wisFromSorted(sorted: ArrayLike<number>, y: number, alphas: readonly number[] = WIS_ALPHAS): number {
  if (sorted.length === 0 || Number.isNaN(y)) return NaN;
  const intervals = alphas.map((alpha) => ({ alpha, lower: quantileSorted(sorted, alpha / 2), upper: quantileSorted(sorted, 1 - alpha / 2) }));
  return weightedIntervalScore(quantileSorted(sorted, 0.5), intervals, y);
}
