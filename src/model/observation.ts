/**
 * Observation model (MODEL.md section 3): delayed, under-ascertained, overdispersed reports.
 *
 *     mu_t = rho * weekday_t * sum_{d=0..Dmax} p_d * onsets_{t-d}
 *     y_t  ~ NegativeBinomial(mean mu_t, dispersion phi)   (variance mu + mu^2/phi)
 */
import { betaln, gammaln } from '../util/stdlib.js';
import { logGamma } from './lgamma.js';

/**
 * mu[t] = sum_d p[d] * onsets[offset + t - d] for t in [from, to); onsets before index 0 count
 * as zero. `offset` is the index of the first observed day in the onset series (seed_days).
 *
 * Four days at a time in local variables (each onset is loaded once per block, not four times,
 * and nothing is stored until the block is done); each mu[t] is summed over d = 0..Dmax in the
 * same order as the one-day-at-a-time loop, so the result is the same to the bit.
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
  let t = from;
  // days whose window reaches before the first simulated day, and the last few: one at a time
  const blockFrom = Math.max(from, dmax - offset);
  for (; t < to && t < blockFrom; t++) mu[t] = convolveOne(p, onsets, offset + t, dmax);
  for (; t + 4 <= to; t += 4) {
    const s = offset + t;
    let m0 = 0;
    let m1 = 0;
    let m2 = 0;
    let m3 = 0;
    // u_j = onsets[s + j - d] at step d
    let u1 = onsets[s + 1];
    let u2 = onsets[s + 2];
    let u3 = onsets[s + 3];
    for (let d = 0; d <= dmax; d++) {
      const u0 = onsets[s - d];
      const pd = p[d];
      m0 += pd * u0;
      m1 += pd * u1;
      m2 += pd * u2;
      m3 += pd * u3;
      u3 = u2;
      u2 = u1;
      u1 = u0;
    }
    mu[t] = m0;
    mu[t + 1] = m1;
    mu[t + 2] = m2;
    mu[t + 3] = m3;
  }
  for (; t < to; t++) mu[t] = convolveOne(p, onsets, offset + t, dmax);
}

function convolveOne(p: Float64Array, onsets: Float64Array, s: number, dmax: number): number {
  const dTop = Math.min(dmax, s);
  let acc = 0;
  for (let d = 0; d <= dTop; d++) acc += p[d] * onsets[s - d];
  return acc;
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
 * Negative-binomial log pmf with mean mu and dispersion phi (variance mu + mu^2/phi), accurate
 * to about 1e-10 relative over the whole range (phi up to 1e8, counts up to 1e6, far tails).
 *
 * @remarks
 * log p(y) = lnG(y + phi) - lnG(phi) - lnG(y + 1) + phi ln(phi/(phi + mu)) + y ln(mu/(phi + mu)),
 * the NB2 parametrisation (Cameron and Trivedi, Regression Analysis of Count Data, 1998,
 * section 3.3; cited from memory);
 * equal to @stdlib's negative-binomial logpmf with r = phi, p = phi/(phi + mu) counting failures.
 * Evaluated without the cancellations of the plain form: for y > 0 the gamma terms are
 * -ln y - ln B(y, phi) (lnG(y + 1) = ln y + lnG(y); ln B from @stdlib's betaln, accurate for
 * large arguments), and ln(phi/(phi + mu)) = -log1p(mu/phi), ln(mu/(phi + mu)) = -log1p(phi/mu).
 * Total: -Infinity for mu = 0 with y > 0, 0 for y = 0 and mu = 0, -Infinity for parameters
 * outside the support (phi <= 0, mu < 0, y < 0, any of them infinite or NaN).
 */
export function negBinLogPmf(y: number, mu: number, phi: number): number {
  if (!(phi > 0 && phi < Infinity) || !(mu >= 0 && mu < Infinity) || !(y >= 0 && y < Infinity)) return -Infinity;
  if (mu === 0) return y === 0 ? 0 : -Infinity;
  const v =
    y === 0
      ? -phi * Math.log1p(mu / phi)
      : -Math.log(y) - betaln(y, phi) - phi * Math.log1p(mu / phi) - y * Math.log1p(phi / mu);
  return v === v ? v : -Infinity;
}

/**
 * Sum of negative-binomial log pmfs over the observed days, given the delayed onsets
 * `delayed[t]` (before ascertainment) and per-day reporting multipliers (`weekday`, or null).
 * Missing days are absent from `obs` and contribute nothing.
 *
 * @remarks
 * Per observed day, with m = rho weekday_t delayed_t,
 * lnG(y + phi) - lnG(phi) - lnG(y + 1) + phi ln phi + y ln m - (phi + y) ln(phi + m)
 * ({@link negBinLogPmf}); the terms that do not depend on the day are summed once, and
 * lnG(y + phi) is {@link logGamma}, which the compiler inlines.
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
  const lgPhi = logGamma(phi);
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
      ll += logGamma(y + phi) + y * Math.log(m) - (phi + y) * Math.log(phi + m);
    }
  }
  return ll;
}
