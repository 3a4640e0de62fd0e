/**
 * Observation model (MODEL.md section 3): delayed, under-ascertained, overdispersed reports.
 *
 *     mu_t = rho * weekday_t * sum_{d=0..Dmax} p_d * onsets_{t-d}
 *     y_t  ~ NegativeBinomial(mean mu_t, dispersion phi)   (variance mu + mu^2/phi)
 */
import { gammaln } from '../util/stdlib.js';

/**
 * mu[t] = sum_d p[d] * onsets[offset + t - d] for t in [from, to); onsets before index 0 count
 * as zero. `offset` is the index of the first observed day in the onset series (seed_days).
 */
export function convolveDelay(
  p: Float64Array,
  onsets: Float64Array,
  offset: number,
  from: number,
  to: number,
  mu: Float64Array,
): void {
  const dmax = p.length - 1;
  for (let t = from; t < to; t++) {
    const s = offset + t;
    const dTop = Math.min(dmax, s);
    let acc = 0;
    for (let d = 0; d <= dTop; d++) acc += p[d] * onsets[s - d];
    mu[t] = acc;
  }
}

/** The observed days of a series: indices of non-missing counts, the counts, sum of lgamma(y+1). */
export interface Observations {
  /** day index (0-based from the first observed date) of each non-missing count */
  readonly index: Int32Array;
  readonly counts: Float64Array;
  /** sum of ln Gamma(y + 1) over the observed counts: constant for a data set, computed once */
  readonly sumLgammaY1: number;
  /** number of days in the series, missing included */
  readonly days: number;
}

/** Collects the non-missing counts (NaN = missing) of a daily series. */
export function observations(counts: ArrayLike<number>): Observations {
  const idx: number[] = [];
  const ys: number[] = [];
  let sum = 0;
  for (let t = 0; t < counts.length; t++) {
    const y = counts[t];
    if (Number.isNaN(y)) continue;
    idx.push(t);
    ys.push(y);
    sum += gammaln(y + 1);
  }
  return { index: Int32Array.from(idx), counts: Float64Array.from(ys), sumLgammaY1: sum, days: counts.length };
}

/**
 * Negative-binomial log pmf with mean mu and dispersion phi (variance mu + mu^2/phi).
 *
 * @remarks
 * log p(y) = lnG(y + phi) - lnG(phi) - lnG(y + 1) + phi ln(phi/(phi + mu)) + y ln(mu/(phi + mu)),
 * the NB2 parametrisation (Cameron and Trivedi, Regression Analysis of Count Data, 1998,
 * section 3.3; cited from memory);
 * equal to @stdlib's negative-binomial logpmf with r = phi, p = phi/(phi + mu) counting failures.
 * Total: -Infinity for mu <= 0 with y > 0, 0 for y = 0 and mu = 0.
 */
export function negBinLogPmf(y: number, mu: number, phi: number): number {
  if (!(phi > 0) || !(mu >= 0) || !(y >= 0)) return -Infinity;
  const logMuTerm = y === 0 ? 0 : y * Math.log(mu);
  const v =
    gammaln(y + phi) - gammaln(phi) - gammaln(y + 1) + phi * Math.log(phi) + logMuTerm - (phi + y) * Math.log(phi + mu);
  return Number.isNaN(v) ? -Infinity : v;
}

/**
 * Sum of negative-binomial log pmfs over the observed days, given the delayed onsets
 * `delayed[t]` (before ascertainment) and per-day reporting multipliers (`weekday`, or null).
 * Missing days are absent from `obs` and contribute nothing.
 */
export function negBinLogLikelihood(
  obs: Observations,
  delayed: Float64Array,
  rho: number,
  weekday: Float64Array | null,
  weekdayOfDay: Uint8Array | null,
  phi: number,
): number {
  const n = obs.index.length;
  const lgPhi = gammaln(phi);
  let ll = n * (phi * Math.log(phi) - lgPhi) - obs.sumLgammaY1;
  const idx = obs.index;
  const ys = obs.counts;
  for (let j = 0; j < n; j++) {
    const t = idx[j];
    let m = rho * delayed[t];
    if (weekday !== null && weekdayOfDay !== null) m *= weekday[weekdayOfDay[t]];
    const y = ys[j];
    if (y === 0) {
      ll += lgPhi - phi * Math.log(phi + m); // lnG(0 + phi) cancels the constant's lnG(phi)
    } else {
      ll += gammaln(y + phi) + y * Math.log(m) - (phi + y) * Math.log(phi + m);
    }
  }
  return ll;
}
