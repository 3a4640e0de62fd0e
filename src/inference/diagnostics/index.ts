/**
 * Convergence diagnostics (Vehtari, Gelman, Simpson, Carpenter and Buerkner 2021, Bayesian
 * Analysis 16(2)) on `chains`, one Float64Array of draws per chain. Besides the re-exports,
 * this file holds {@link summarizeDiagnostics}, which only composes them.
 */
import { type Chains, drawsIssue, pooledVariance, splitRankings } from './helpers.js';
import { geyerEss, tailEssOfSplit } from './ess.js';
import { rhatOfRanked } from './rhat.js';

export {
  type Chains,
  type DrawsIssue,
  MIN_DRAWS_PER_SPLIT_CHAIN,
  autocovariance,
  drawsIssue,
  fold,
  rankNormalize,
  splitChains,
} from './helpers.js';
export { effectiveSampleSize, essBasic, essBulk, essTail, quantileEss } from './ess.js';
export { mcseMean } from './mcse.js';
export { potentialScaleReduction, rhat, rhatBasic } from './rhat.js';

/** The diagnostics the fit reports for one quantity. */
export interface DiagnosticsSummary {
  /** {@link rhat}: max of rank-normalised and folded split R-hat */
  rhat: number;
  /** {@link essBulk} */
  essBulk: number;
  /** {@link essTail} */
  essTail: number;
  /** {@link mcseMean} */
  mcseMean: number;
}

/**
 * R-hat, bulk and tail ESS and the Monte Carlo standard error of the mean of one quantity;
 * equal to calling {@link rhat}, {@link essBulk}, {@link essTail} and {@link mcseMean} one by
 * one, with the split and rank-normalised draws computed once.
 *
 * @returns every field NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or
 * infinite, or all draws are equal; {@link drawsIssue} says which.
 *
 * @example
 * ```ts
 * summarizeDiagnostics([Float64Array.of(1, 2, 3, 4, 5, 6, 7), Float64Array.of(7, 6, 5, 4, 3, 2, 1)]);
 * // { rhat: NaN, essBulk: NaN, essTail: NaN, mcseMean: NaN }: 7 draws leave 3 per half
 * ```
 */
export function summarizeDiagnostics(chains: Chains): DiagnosticsSummary {
  if (drawsIssue(chains) !== undefined) {
    return { rhat: NaN, essBulk: NaN, essTail: NaN, mcseMean: NaN };
  }
  const { split, sorted, ranked, foldedRanked } = splitRankings(chains);
  return {
    rhat: rhatOfRanked(ranked, foldedRanked),
    essBulk: geyerEss(ranked),
    essTail: tailEssOfSplit(split, sorted),
    mcseMean: Math.sqrt(pooledVariance(chains) / geyerEss(split)),
  };
}
