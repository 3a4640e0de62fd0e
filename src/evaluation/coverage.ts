/**
 * Whether outcomes fall inside central prediction intervals, and how often.
 */
import { quantileSorted } from '../outputs/stats.js';

/** The central interval holding `level` of the sorted samples: the (1 -/+ level)/2 sample quantiles (type 7). */
export function centralInterval(sorted: ArrayLike<number>, level: number): [number, number] {
  return [quantileSorted(sorted, (1 - level) / 2), quantileSorted(sorted, (1 + level) / 2)];
}

/** 1 when y lies in [lower, upper] (both ends included), else 0; NaN for a NaN outcome or bound. */
export function inside(y: number, lower: number, upper: number): number {
  if (Number.isNaN(y) || Number.isNaN(lower) || Number.isNaN(upper)) return NaN;
  return y >= lower && y <= upper ? 1 : 0;
}

/**
 * Empirical coverage: the share of the indicators (from {@link inside}) that are 1, NaN ones
 * left out; NaN when none is left. A calibrated central interval of level p covers about p of
 * the outcomes (common practice).
 */
export function coverage(indicators: ArrayLike<number>): number {
  let hit = 0;
  let n = 0;
  for (let i = 0; i < indicators.length; i++) {
    const v = indicators[i];
    if (Number.isNaN(v)) continue;
    n++;
    hit += v;
  }
  return n === 0 ? NaN : hit / n;
}
