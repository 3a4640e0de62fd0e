/**
 * Monte Carlo standard error of the posterior mean (Vehtari, Gelman, Simpson, Carpenter and
 * Buerkner 2021, Bayesian Analysis 16(2)).
 */
import { type Chains, drawsIssue, pooledVariance } from './helpers.js';
import { essBasic } from './ess.js';

/**
 * Monte Carlo standard error of the mean of all draws: sd / sqrt(ESS), sd the standard
 * deviation of all draws pooled (divisor S - 1) and ESS the basic ESS of the split chains on
 * the draws themselves (not rank-normalised, as the mean is not rank-invariant).
 *
 * @remarks Vehtari et al. (2021) (Monte Carlo error of the mean from the ESS);
 * for independent draws this is the textbook sd / sqrt(S).
 * @returns NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or infinite,
 * or all draws are equal (a constant has no ESS; it is reported as undefined rather than as an
 * error of 0).
 */
export function mcseMean(chains: Chains): number {
  if (drawsIssue(chains) !== undefined) return NaN;
  return Math.sqrt(pooledVariance(chains) / essBasic(chains));
}
