/**
 * Effective sample size: the multi-chain Geyer estimator and the bulk, tail and basic
 * variants of Vehtari, Gelman, Simpson, Carpenter and Buerkner (2021), Bayesian Analysis 16(2).
 */
import {
  type Chains,
  MIN_DRAWS_PER_SPLIT_CHAIN,
  chainLength,
  drawsIssue,
  mean,
  meanAutocovariancePair,
  meanAutocovarianceFft,
  quantileOfSorted,
  rankNormalize,
  sampleVariance,
  sortedDraws,
  splitChains,
} from './helpers.js';

/**
 * Below this lag the autocovariances are summed directly, in pairs of lags; the first lag past
 * it switches to one FFT for all lags. Well-mixing chains end Geyer's sequence within a few
 * lags, where the direct sums cost less than the transform (here one transform of the split
 * chains of a 4 x 20,000 fit costs about as much as 20 direct lags).
 */
const DIRECT_LAGS = 20;

/**
 * A lag-1 autocorrelation above this announces a sequence running past
 * {@link DIRECT_LAGS}, so the transform is used from lag 2 on. For an AR(1) chain,
 * rho_t = a^t falls to the noise level sqrt(tau / S) after log(sqrt(tau / S)) / log(a) lags:
 * 16 lags for a = 0.75 and S = 80,000, 36 for a = 0.9.
 */
const SLOW_LAG1 = 0.75;

/**
 * The mean chain autocovariance at any lag from `directLags` on, computed as far as it is
 * asked for; lags below `directLags` are never asked for (the caller has them).
 */
function lazyMeanAutocovariance(
  chains: Chains,
  means: Float64Array,
  directLags: number,
): (lag: number) => number {
  const n = chainLength(chains);
  const direct = new Float64Array(directLags + 2);
  let directDone = 0;
  let table: Float64Array | undefined;
  return (lag) => {
    if (table !== undefined && lag < table.length) return table[lag]!;
    if (table === undefined && lag < directLags) {
      while (directDone <= lag) {
        [direct[directDone], direct[directDone + 1]] = meanAutocovariancePair(chains, means, directDone);
        directDone += 2;
      }
      return direct[lag]!;
    }
    // First the lags up to n/4, a shorter transform; a sequence that runs past n/4 belongs to
    // a chain that barely moved, and pays for the full transform.
    const maxLag = lag <= Math.ceil(n / 4) ? Math.ceil(n / 4) : n - 1;
    table = meanAutocovarianceFft(chains, means, maxLag);
    return table[lag]!;
  };
}

/**
 * Effective sample size of the draws in `chains`, taken as they are (no splitting, no rank
 * normalisation): S / tau with S = M N draws and tau the integrated autocorrelation time
 * from Geyer's initial monotone sequence over all chains.
 *
 * @remarks Vehtari et al. (2021), section 3.2 and appendix A, with the multi-chain
 * autocorrelation of Gelman et al., Bayesian Data Analysis, 3rd ed., section 11.5:
 * - W = mean of the chain variances, var+ = (N - 1)/N W + B/N (B/N the variance of the chain
 *   means), rho_t = 1 - (W - mean over chains of the biased autocovariance at lag t) / var+;
 * - pair sums P_k = rho_{2k} + rho_{2k+1} are kept while positive (Geyer 1992, initial
 *   positive sequence), the lag loop ending at t < N - 5 at the latest, then made
 *   non-increasing (initial monotone sequence);
 * - tau = -1 + 2 sum_{t < T} rho_t + rho_T, the last term (the even autocorrelation after the
 *   last kept pair, when positive) being the paper's improvement for antithetic chains, which
 *   may give an ESS above S;
 * - tau is bounded below by 1 / log10(S), so the ESS never exceeds S log10(S).
 *
 * With N = 4 or 5 draws per chain the length bound leaves only the first pair, and
 * tau = -1 + 2 (1 + rho_1).
 *
 * @returns NaN when there are fewer than {@link MIN_DRAWS_PER_SPLIT_CHAIN} draws per chain,
 * a draw is NaN or infinite, or all draws are equal (no variance to share out).
 */
export function effectiveSampleSize(chains: Chains): number {
  if (drawsIssue(chains, MIN_DRAWS_PER_SPLIT_CHAIN) !== undefined) return NaN;
  return geyerEss(chains);
}

/**
 * {@link effectiveSampleSize} of finite draws, at least 4 per chain, whose checks the caller
 * has made; NaN when they have no variance.
 */
export function geyerEss(chains: Chains): number {
  const m = chains.length;
  const n = chainLength(chains);
  const means = new Float64Array(chains.map(mean));
  const [acov0, acov1] = meanAutocovariancePair(chains, means, 0);
  const within = (acov0 * n) / (n - 1);
  const varPlus = acov0 + (m > 1 ? sampleVariance(means) : 0);
  if (!(varPlus > 0)) return NaN;

  const rho = new Float64Array(n);
  let rhoEven = 1;
  let rhoOdd = 1 - (within - acov1) / varPlus;
  rho[0] = rhoEven;
  rho[1] = rhoOdd;
  const acov = lazyMeanAutocovariance(chains, means, rhoOdd > SLOW_LAG1 ? 2 : DIRECT_LAGS);
  let t = 0;
  while (t < n - 5 && rhoEven + rhoOdd > 0) {
    t += 2;
    rhoEven = 1 - (within - acov(t)) / varPlus;
    rhoOdd = 1 - (within - acov(t + 1)) / varPlus;
    if (rhoEven + rhoOdd >= 0) {
      rho[t] = rhoEven;
      rho[t + 1] = rhoOdd;
    }
  }
  let last = t;
  if (t === 0 && rhoEven + rhoOdd > 0) {
    // N < 6: the length bound stopped the loop before it looked past the first pair, which is
    // positive and so kept whole: tau = -1 + 2 (rho_0 + rho_1).
    last = 2;
  } else if (rhoEven > 0) {
    rho[last] = rhoEven;
  }
  for (let u = 2; u <= last - 2; u += 2) {
    const previous = rho[u - 2]! + rho[u - 1]!;
    if (rho[u]! + rho[u + 1]! > previous) {
      rho[u] = previous / 2;
      rho[u + 1] = previous / 2;
    }
  }
  let sum = 0;
  for (let u = 0; u < last; u++) sum += rho[u]!;
  const draws = m * n;
  const tau = Math.max(-1 + 2 * sum + rho[last]!, 1 / Math.log10(draws));
  return draws / tau;
}

/**
 * Basic ESS: {@link effectiveSampleSize} of the split chains, on the draws themselves. It
 * estimates how precisely the mean is known, when the mean and variance exist.
 *
 * @remarks Vehtari et al. (2021), section 3.2.
 * @returns NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or infinite,
 * or all draws are equal.
 */
export function essBasic(chains: Chains): number {
  if (drawsIssue(chains) !== undefined) return NaN;
  return geyerEss(splitChains(chains));
}

/**
 * Bulk ESS: {@link effectiveSampleSize} of the rank-normalised split chains; the sampling
 * efficiency in the bulk of the distribution, defined for any tails.
 *
 * @remarks Vehtari et al. (2021), section 4.3 ("bulk-ESS").
 * @returns NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or infinite,
 * or all draws are equal.
 */
export function essBulk(chains: Chains): number {
  if (drawsIssue(chains) !== undefined) return NaN;
  return geyerEss(rankNormalize(splitChains(chains)));
}

/**
 * ESS of the indicator I(x <= q), q the p-quantile of all draws in `chains` (taken as given,
 * not split here): how precisely the p-quantile's probability is known.
 *
 * @remarks Vehtari et al. (2021), section 4.3 (ESS of the quantiles); q by definition 7 of
 * Hyndman and Fan (1996). NaN when the indicator is constant (a point mass covering the
 * quantile) or for the reasons of {@link effectiveSampleSize}.
 */
export function quantileEss(chains: Chains, p: number): number {
  if (drawsIssue(chains, MIN_DRAWS_PER_SPLIT_CHAIN) !== undefined) return NaN;
  return indicatorEss(chains, quantileOfSorted(sortedDraws(chains), p));
}

/**
 * ESS of I(x <= q) over the chains as given (see {@link quantileEss}); the chains must be
 * finite with at least 4 draws each. NaN when the indicator is constant.
 */
export function indicatorEss(chains: Chains, q: number): number {
  const indicators = chains.map((chain) => {
    const out = new Float64Array(chain.length);
    for (let i = 0; i < chain.length; i++) out[i] = chain[i]! <= q ? 1 : 0;
    return out;
  });
  return geyerEss(indicators);
}

/**
 * Tail ESS: the smaller of the ESS of I(x <= q05) and of I(x <= q95) over the split chains;
 * the sampling efficiency for the 5% and 95% quantiles, which set 90% intervals.
 *
 * @remarks Vehtari et al. (2021), section 4.3 ("tail-ESS"); see {@link quantileEss}.
 * @returns NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or infinite,
 * all draws are equal, or either indicator is constant.
 */
export function essTail(chains: Chains): number {
  if (drawsIssue(chains) !== undefined) return NaN;
  const split = splitChains(chains);
  return tailEssOfSplit(split, sortedDraws(split));
}

/** {@link essTail} from the split chains and their draws sorted. */
export function tailEssOfSplit(split: Chains, sorted: Float64Array): number {
  return Math.min(
    indicatorEss(split, quantileOfSorted(sorted, 0.05)),
    indicatorEss(split, quantileOfSorted(sorted, 0.95)),
  );
}
