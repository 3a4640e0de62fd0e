/**
 * The pieces of simulation-based calibration that do not depend on the model: the rank of a
 * true value among posterior draws, the rank histogram, and a chi-square test of its
 * uniformity.
 *
 * @remarks Talts, Betancourt, Simpson, Vehtari and Gelman (2018), "Validating Bayesian
 * inference algorithms with simulation-based calibration", arXiv:1804.06788: if the truth
 * theta~ is drawn from the prior, data from the model given theta~, and theta_1..theta_L from
 * the exact posterior given those data, the rank sum_l 1{theta_l < theta~} is uniform on
 * 0..L (their Theorem 1), whatever the model.
 */
import { chisqCdf } from '../util/stdlib.js';
import type { Rng } from '../util/rng.js';

/**
 * Rank of `truth` among `draws`: the number of draws below it, with ties (possible for
 * discrete quantities) broken uniformly at random with `rng` so that the rank stays uniform
 * (Talts et al. 2018, section 4.1). NaN when the truth or a draw is NaN.
 *
 * @example rankOf(2.5, [1, 2, 3, 4], rng) === 2
 */
export function rankOf(truth: number, draws: ArrayLike<number>, rng: Rng): number {
  if (Number.isNaN(truth)) return NaN;
  let below = 0;
  let equal = 0;
  for (let l = 0; l < draws.length; l++) {
    const v = draws[l];
    if (Number.isNaN(v)) return NaN;
    if (v < truth) below++;
    else if (v === truth) equal++;
  }
  return equal === 0 ? below : below + Math.floor(rng.uniform() * (equal + 1));
}

/**
 * Indices of `count` draws spread evenly over `total` kept draws (chains one after the other):
 * thinning, so that the ranked draws are nearly independent (Talts et al. 2018, section 5.1:
 * autocorrelated draws make a correct posterior's ranks pile up at both ends).
 */
export function thinEvenly(total: number, count: number): number[] {
  if (!(count >= 1 && count <= total)) throw new RangeError(`thinEvenly: cannot pick ${count} of ${total} draws`);
  return Array.from({ length: count }, (_, l) => Math.floor(((l + 0.5) * total) / count));
}

/**
 * Counts of ranks (each 0..L) in `bins` bins of equal width: bin b holds ranks
 * b (L + 1)/bins .. (b + 1)(L + 1)/bins - 1. NaN ranks are left out. L + 1 must be a multiple
 * of `bins`, so that every bin is equally likely under uniformity.
 */
export function rankHistogram(ranks: ArrayLike<number>, draws: number, bins: number): number[] {
  const values = draws + 1;
  if (!Number.isInteger(bins) || bins < 2 || values % bins !== 0) {
    throw new RangeError(`rankHistogram: ${values} possible ranks do not split into ${bins} equal bins`);
  }
  const width = values / bins;
  const counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < ranks.length; i++) {
    const r = ranks[i];
    if (Number.isNaN(r)) continue;
    if (!(r >= 0 && r <= draws && Number.isInteger(r))) throw new RangeError(`rankHistogram: rank ${r} outside 0..${draws}`);
    counts[Math.floor(r / width)]++;
  }
  return counts;
}

export interface UniformityTest {
  /** Pearson's statistic sum_b (O_b - E)^2 / E with E = n / bins */
  chiSquare: number;
  /** bins - 1 */
  df: number;
  /** P(X >= chiSquare) for X ~ chi-square(df); small values speak against uniformity */
  pValue: number;
}

/**
 * Pearson's chi-square test that the bin counts come from equally likely bins (Pearson 1900;
 * any statistics text), with the chi-square distribution function of @stdlib. NaN with no
 * counts.
 *
 * @example uniformityTest([10, 10, 10, 10]).chiSquare === 0
 */
export function uniformityTest(counts: readonly number[]): UniformityTest {
  const n = counts.reduce((a, c) => a + c, 0);
  const bins = counts.length;
  if (n === 0) return { chiSquare: NaN, df: bins - 1, pValue: NaN };
  const expected = n / bins;
  const chiSquare = counts.reduce((a, c) => a + (c - expected) ** 2 / expected, 0);
  return { chiSquare, df: bins - 1, pValue: 1 - chisqCdf(chiSquare, bins - 1) };
}
