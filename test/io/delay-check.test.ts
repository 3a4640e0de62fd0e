import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { WaxwaneError } from '../../src/errors.js';
import { checkDelay, MIN_DELAY_MASS } from '../../src/io/delay-check.js';
import type { DelaySpec } from '../../src/model/prior-set.js';

// reference CDF from @stdlib, a general-purpose library (not the project's own delay code)
const require = createRequire(import.meta.url);
const gammaCdf = require('@stdlib/stats/base/dists/gamma/cdf') as (x: number, shape: number, rate: number) => number;
/** Share of a gamma delay (by mean and sd: shape (m/s)^2, rate m/s^2) within 0..max_days. */
const keptGamma = (d: DelaySpec) => gammaCdf(d.max_days + 1, (d.mean / d.sd) ** 2, d.mean / (d.sd * d.sd));

function refusal(d: DelaySpec): string {
  try {
    checkDelay(d, 'priors.json', 'model.delay');
  } catch (err) {
    expect(err).toBeInstanceOf(WaxwaneError);
    return (err as Error).message;
  }
  throw new Error('expected a refusal');
}

describe('checkDelay', () => {
  it('accepts the default delay (gamma, mean 5, sd 3, cut at 21 days: nearly all of it kept)', () => {
    const d: DelaySpec = { family: 'gamma', mean: 5, sd: 3, max_days: 21 };
    expect(keptGamma(d)).toBeGreaterThan(0.999);
    expect(() => checkDelay(d, 'priors.json', 'model.delay')).not.toThrow();
    expect(() => checkDelay({ ...d, family: 'lognormal' }, 'priors.json', 'model.delay')).not.toThrow();
  });

  it('accepts a delay keeping just over half of its distribution, refuses one keeping just under', () => {
    // gamma with mean 20 and sd 3: the share within 0..max_days crosses 1/2 between these cuts
    const over: DelaySpec = { family: 'gamma', mean: 20, sd: 3, max_days: 19 };
    const under: DelaySpec = { ...over, max_days: 18 };
    expect(keptGamma(over)).toBeGreaterThan(MIN_DELAY_MASS);
    expect(keptGamma(under)).toBeLessThan(MIN_DELAY_MASS);
    expect(() => checkDelay(over, 'priors.json', 'model.delay')).not.toThrow();
    const share = `${(100 * keptGamma(under)).toPrecision(2)}%`;
    expect(refusal(under)).toBe(
      `priors.json, field "model.delay.max_days": the gamma delay with mean 20 and sd 3 keeps ${share} of its probability ` +
        'within 0 to 18 days (at least 50% is needed: the rest is cut off); raise max_days (up to 60), or check the mean and the sd',
    );
  });

  it('says "almost none" for a delay wholly beyond max_days, and refuses one that cannot be computed', () => {
    expect(refusal({ family: 'gamma', mean: 97, sd: 3, max_days: 21 })).toMatch(/keeps almost none of its probability within 0 to 21 days/);
    expect(refusal({ family: 'lognormal', mean: 5, sd: 1e-300, max_days: 21 })).toBe(
      'priors.json, field "model.delay": the lognormal delay with mean 5 and sd 1e-300 cannot be computed; ' +
        'give a mean and an sd of a plausible number of days (an sd far smaller than the mean gives no usable distribution)',
    );
  });
});
