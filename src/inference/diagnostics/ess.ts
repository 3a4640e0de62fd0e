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
  meanAutocovarianceFft,
  meanAutocovariancePair,
  quantileOfSorted,
  rankNormalize,
  sampleVariance,
  sortedDraws,
  splitChains,
} from './helpers.js';

/**
 * Autocovariances are summed directly, two lags per pass over the draws, while Geyer's
 * sequence looks short; one FFT gives all lags at about the cost of this many direct lags
 * (measured on the split chains of a 4 x 20,000 fit), so a sequence expected to run past it
 * switches to the transform.
 */
const TRANSFORM_COST_IN_LAGS = 30;

/**
 * Where the autocorrelation sequence is expected to reach the noise level 1/sqrt(S), from its
 * value `rho` at `lag`, taking it as geometric (an AR(1) chain's rho_t = a^t): lag * ln(S) /
 * (-2 ln rho). Only a guide to the cheaper way of computing the lags; the estimate itself is
 * the same either way. The guess runs short for indicator series (tail ESS), whose
 * autocorrelations start low and decay slowly, hence the switch at 2/3 of the break-even.
 */
function expectedEnd(lag: number, rho: number, draws: number): number {
  if (!(rho > 0)) return lag;
  if (rho >= 1) return Infinity;
  return (lag * Math.log(draws)) / (-2 * Math.log(rho));
}

/**
 * The mean chain autocovariances around `means`, lag by lag: summed directly, two lags per
 * pass, until `useTransform()`; then (and for any lag past {@link TRANSFORM_COST_IN_LAGS}) by
 * one FFT, first for lags up to n/4 and, should the sequence run past that (a chain that
 * barely moved), for all lags.
 */
function lagSums(chains: Chains, means: Float64Array) {
  const n = chainLength(chains);
  const direct = new Float64Array(TRANSFORM_COST_IN_LAGS + 2);
  let directDone = 0;
  let transform = false;
  let table: Float64Array | undefined;
  return {
    useTransform(): void {
      transform = true;
    },
    at(lag: number): number {
      if (lag < directDone) return direct[lag]!;
      if (!transform && lag < TRANSFORM_COST_IN_LAGS) {
        while (directDone <= lag) {
          [direct[directDone], direct[directDone + 1]] = meanAutocovariancePair(chains, means, directDone);
          directDone += 2;
        }
        return direct[lag]!;
      }
      if (table === undefined || lag >= table.length) {
        const maxLag = lag <= Math.ceil(n / 4) ? Math.ceil(n / 4) : n - 1;
        table = meanAutocovarianceFft(chains, means, maxLag);
      }
      return table[lag]!;
    },
  };
}

/**
 * Effective sample size of the draws in `chains`, taken as they are (no splitting, no rank
 * normalisation): S / tau with S = M N draws and tau the integrated autocorrelation time
 * from Geyer's initial monotone sequence over all chains.
 *
 * @remarks Vehtari et al. (2021) and the reference implementation published
 * with it (recalled from memory), with the multi-chain autocorrelation of Gelman et al.,
 * Bayesian Data Analysis, 3rd ed., section 11.5:
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
 * With N = 4 or 5 draws per chain the published loop never runs (t < N - 5 fails at once);
 * our choice there is to keep the first pair whole, as Geyer's sequence would:
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
  const draws = m * n;
  const acov = lagSums(chains, means);
  const acov0 = acov.at(0);
  const within = (acov0 * n) / (n - 1);
  const varPlus = acov0 + (m > 1 ? sampleVariance(means) : 0);
  if (!(varPlus > 0)) return NaN;
  const rhoAt = (lag: number) => 1 - (within - acov.at(lag)) / varPlus;

  const rho = new Float64Array(n);
  let rhoEven = 1;
  let rhoOdd = rhoAt(1);
  rho[0] = rhoEven;
  rho[1] = rhoOdd;
  let t = 0;
  while (t < n - 5 && rhoEven + rhoOdd > 0) {
    if (expectedEnd(t + 1, rhoOdd, draws) > (2 / 3) * TRANSFORM_COST_IN_LAGS) acov.useTransform();
    t += 2;
    rhoEven = rhoAt(t);
    rhoOdd = rhoAt(t + 1);
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
  const tau = Math.max(-1 + 2 * sum + rho[last]!, 1 / Math.log10(draws));
  return draws / tau;
}

/**
 * Basic ESS: {@link effectiveSampleSize} of the split chains, on the draws themselves. It
 * estimates how precisely the mean is known, when the mean and variance exist.
 *
 * @remarks Vehtari et al. (2021).
 * @returns NaN when a chain has fewer than 8 draws (4 per half), a draw is NaN or infinite,
 * or all draws are equal.
 *
 * @example
 * ```ts
 * essBasic([Float64Array.of(2, 4, 3, 3, 5, 7, 6, 6), Float64Array.of(1, 5, 3, 3, 4, 4, 2, 6)]);
 * // 312 / 31 = 10.0645... (worked by hand in the tests)
 * ```
 */
export function essBasic(chains: Chains): number {
  if (drawsIssue(chains) !== undefined) return NaN;
  return geyerEss(splitChains(chains));
}

/**
 * Bulk ESS: {@link effectiveSampleSize} of the rank-normalised split chains; the sampling
 * efficiency in the bulk of the distribution, defined for any tails.
 *
 * @remarks Vehtari et al. (2021) ("bulk-ESS").
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
 * @remarks Vehtari et al. (2021) (ESS of the quantiles); q by definition 7 of
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
 * @remarks Vehtari et al. (2021) ("tail-ESS"); see {@link quantileEss}.
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
