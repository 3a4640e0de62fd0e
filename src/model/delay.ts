import type { DelaySpec } from './prior-set.js';
import { gammaCdf, lognormalCdf } from '../util/stdlib.js';

/**
 * Onset-to-report delay as a probability mass function over d = 0..max_days.
 *
 * @remarks
 * p_d = F(d + 1) - F(d), renormalised to sum to 1 over 0..Dmax (MODEL.md section 3), where F is
 * the CDF of a gamma (shape (mean/sd)^2, rate mean/sd^2) or a lognormal distribution with the
 * given mean and sd (sigma^2 = ln(1 + sd^2/mean^2), mu = ln(mean) - sigma^2/2). The moment
 * relations are the standard ones for both families.
 *
 * @example discretiseDelay({ family: 'gamma', mean: 5, sd: 3, max_days: 21 })[0] is about 0.0286
 */
export function discretiseDelay(spec: DelaySpec): Float64Array {
  const { mean, sd } = spec;
  if (!(mean > 0) || !(sd > 0) || !Number.isInteger(spec.max_days) || spec.max_days < 0) {
    throw new RangeError(`invalid delay: mean ${mean}, sd ${sd}, max_days ${spec.max_days}`);
  }
  const cdf = delayCdf(spec);
  const p = new Float64Array(spec.max_days + 1);
  let prev = 0;
  let total = 0;
  for (let d = 0; d <= spec.max_days; d++) {
    const cur = cdf(d + 1);
    p[d] = cur - prev;
    prev = cur;
    total += p[d];
  }
  if (!(total > 0)) throw new RangeError('delay distribution puts no mass on 0..max_days');
  for (let d = 0; d < p.length; d++) p[d] /= total;
  return p;
}

/** The continuous delay CDF for a spec (gamma or lognormal by mean and sd). */
export function delayCdf(spec: Pick<DelaySpec, 'family' | 'mean' | 'sd'>): (x: number) => number {
  const { mean, sd } = spec;
  if (spec.family === 'gamma') {
    const shape = (mean / sd) ** 2;
    const rate = mean / (sd * sd);
    return (x) => gammaCdf(x, shape, rate);
  }
  const sigma2 = Math.log(1 + (sd * sd) / (mean * mean));
  const mu = Math.log(mean) - sigma2 / 2;
  const sigma = Math.sqrt(sigma2);
  return (x) => (x <= 0 ? 0 : lognormalCdf(x, mu, sigma));
}
