/**
 * ln Gamma for the negative-binomial likelihood's hot loop: Stirling's series where it is exact
 * to rounding (x >= 10), small enough for the optimising compiler to inline (so no double is
 * boxed), and @stdlib's gammaln elsewhere.
 */
import { gammaln } from '../util/stdlib.js';

/** ln(2 pi) / 2 */
const HALF_LN_2PI = 0.91893853320467274178;
// B_{2k} / (2k (2k - 1)), k = 1..7
const C1 = 1 / 12;
const C2 = -1 / 360;
const C3 = 1 / 1260;
const C4 = -1 / 1680;
const C5 = 1 / 1188;
const C6 = -691 / 360360;
const C7 = 1 / 156;

/** Lower end of the range where Stirling's series is used. */
export const LOG_GAMMA_SERIES_FROM = 10;
/** Upper end (beyond it @stdlib's gammaln, which switches to x (ln x - 1) itself). */
export const LOG_GAMMA_SERIES_TO = 1e15;

/**
 * ln Gamma(x): Stirling's series for x in [10, 1e15), @stdlib's gammaln elsewhere.
 *
 * @remarks
 * ln Gamma(x) = (x - 1/2) ln x - x + ln(2 pi)/2 + sum_{k=1..7} B_{2k} / (2k (2k - 1) x^(2k-1)) + R,
 * with B_2..B_14 = 1/6, -1/30, 1/42, -1/30, 5/66, -691/2730, 7/6 (Stirling's series:
 * Abramowitz and Stegun, Handbook of Mathematical Functions, 1964, 6.1.40 and table 23.2).
 * The series is asymptotic; the remainder is smaller than the first omitted term,
 * 3617 / (122400 x^15), below 3e-17 for x >= 10, so the result is exact to rounding.
 * Below 10 (near the zeros of ln Gamma at 1 and 2 a relative accuracy needs other methods)
 * and from 1e15 on, the value is @stdlib's gammaln(x).
 *
 * @example logGamma(20) is ln(19!) = 39.339884187199495 (test/model/lgamma.test.ts checks it)
 */
export function logGamma(x: number): number {
  if (x >= LOG_GAMMA_SERIES_FROM && x < LOG_GAMMA_SERIES_TO) {
    const z = 1 / x;
    const z2 = z * z;
    const series = z * (C1 + z2 * (C2 + z2 * (C3 + z2 * (C4 + z2 * (C5 + z2 * (C6 + z2 * C7))))));
    return (x - 0.5) * Math.log(x) - x + (HALF_LN_2PI + series);
  }
  return gammaln(x);
}
