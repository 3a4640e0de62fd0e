/**
 * R-hat: the potential scale reduction of Gelman and Rubin, split, rank-normalised and folded
 * as in Vehtari, Gelman, Simpson, Carpenter and Buerkner (2021), Bayesian Analysis 16(2).
 */
import {
  type Chains,
  MIN_DRAWS_PER_SPLIT_CHAIN,
  chainLength,
  drawsIssue,
  mean,
  sampleVariance,
  splitChains,
  splitRankings,
} from './helpers.js';

/**
 * Potential scale reduction of the chains as given (no splitting): sqrt(var+ / W), with
 * B = N var(chain means), W = mean of the chain variances (both with the n - 1 divisor) and
 * var+ = (N - 1)/N W + B/N.
 *
 * @remarks Gelman et al., Bayesian Data Analysis, 3rd ed., section 11.4; Vehtari et al.
 * (2021).
 * @returns NaN for fewer than 2 chains, fewer than {@link MIN_DRAWS_PER_SPLIT_CHAIN} draws per
 * chain, a NaN or infinite draw, or all draws equal; +Infinity when every chain is constant
 * but the chains differ (W = 0 < B: the chains never mixed).
 */
export function potentialScaleReduction(chains: Chains): number {
  if (chains.length < 2 || drawsIssue(chains, MIN_DRAWS_PER_SPLIT_CHAIN) !== undefined) {
    return NaN;
  }
  return scaleReduction(chains);
}

/**
 * {@link potentialScaleReduction} of finite draws, at least 2 chains of at least 4 draws,
 * whose checks the caller has made; NaN when all draws are equal.
 */
export function scaleReduction(chains: Chains): number {
  const n = chainLength(chains);
  const means = new Float64Array(chains.map(mean));
  let within = 0;
  for (const chain of chains) within += sampleVariance(chain);
  within /= chains.length;
  const betweenOverN = sampleVariance(means);
  const varPlus = ((n - 1) / n) * within + betweenOverN;
  return Math.sqrt(varPlus / within);
}

/**
 * Split R-hat of the draws themselves ({@link potentialScaleReduction} of the split chains).
 *
 * @remarks Gelman et al., Bayesian Data Analysis, 3rd ed., section 11.4. It sees chains that
 * disagree in location; it misses chains that differ only in spread, and needs a finite
 * variance. Prefer {@link rhat}.
 * @returns NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or infinite,
 * or all draws are equal; +Infinity when the split chains are each constant but differ.
 *
 * @example
 * ```ts
 * rhatBasic([Float64Array.of(2, 4, 3, 3, 5, 7, 6, 6), Float64Array.of(1, 5, 3, 3, 4, 4, 2, 6)]);
 * // sqrt(39 / 20) = 1.396424004376894
 * ```
 */
export function rhatBasic(chains: Chains): number {
  if (drawsIssue(chains) !== undefined) return NaN;
  return scaleReduction(splitChains(chains));
}

/**
 * R-hat as recommended by Vehtari et al. (2021): the larger of the split R-hat of the
 * rank-normalised draws (differences in location) and that of the rank-normalised folded
 * draws |x - median| (differences in spread). Values above 1.01 mean the chains have not
 * mixed.
 *
 * @remarks Vehtari et al. (2021): rank-normalised split-R-hat, folded split-R-hat, and the
 * maximum of the two. The chains are split, then folded around
 * the median of the split draws, then rank-normalised. (The paper folds before splitting; the
 * two differ only for an odd chain length, by the one middle draw per chain left out of the
 * median.)
 * When the folded draws are all equal (say two values, half the draws each) their R-hat is
 * undefined, there being no spreads to compare, and the bulk R-hat is returned alone.
 *
 * @returns NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or infinite,
 * or all draws are equal; +Infinity when the split chains are each constant but differ.
 */
export function rhat(chains: Chains): number {
  if (drawsIssue(chains) !== undefined) return NaN;
  const { ranked, foldedRanked } = splitRankings(chains);
  return rhatOfRanked(ranked, foldedRanked);
}

/**
 * {@link rhat} from the rank-normalised split chains and rank-normalised folded split chains
 * (see `splitRankings`).
 */
export function rhatOfRanked(ranked: Chains, foldedRanked: Chains): number {
  const bulk = scaleReduction(ranked);
  const tail = scaleReduction(foldedRanked);
  // scaleReduction of finite draws is NaN only for constant draws.
  return Number.isNaN(tail) ? bulk : Math.max(bulk, tail);
}
