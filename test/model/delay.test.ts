import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { discretiseDelay, delayCdf } from '../../src/model/delay.js';
import type { DelaySpec } from '../../src/model/prior-set.js';

// Reference functions straight from @stdlib (a general-purpose library), not through the project.
const require = createRequire(import.meta.url);
type F3 = (x: number, a: number, b: number) => number;
type F2 = (a: number, b: number) => number;
const gammaCdf: F3 = require('@stdlib/stats/base/dists/gamma/cdf');
const gammaMean: F2 = require('@stdlib/stats/base/dists/gamma/mean');
const gammaVariance: F2 = require('@stdlib/stats/base/dists/gamma/variance');
const lognormalCdf: F3 = require('@stdlib/stats/base/dists/lognormal/cdf');
const lognormalMean: F2 = require('@stdlib/stats/base/dists/lognormal/mean');
const lognormalVariance: F2 = require('@stdlib/stats/base/dists/lognormal/variance');

/** Gamma (shape, rate) from mean and sd: shape = (mean/sd)^2, rate = mean/sd^2 (standard moments). */
const gammaParams = (mean: number, sd: number) => [(mean / sd) ** 2, mean / sd ** 2] as const;
/** Lognormal (mu, sigma) from mean and sd: sigma^2 = ln(1 + sd^2/mean^2), mu = ln mean - sigma^2/2 (standard moments). */
const lognormalParams = (mean: number, sd: number) => {
  const s2 = Math.log(1 + (sd / mean) ** 2);
  return [Math.log(mean) - s2 / 2, Math.sqrt(s2)] as const;
};

/**
 * ln Gamma(x) for x > 0 by the Lanczos approximation (g = 7, 9 coefficients; Numerical Recipes /
 * the widely reprinted coefficient set, from memory), accurate to ~1e-15 relative here.
 */
function lnGammaLanczos(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
    -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
    1.5056327351493116e-7,
  ];
  const z = x - 1;
  let a = c[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += c[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

const specs: DelaySpec[] = [
  { family: 'gamma', mean: 5, sd: 3, max_days: 21 },
  { family: 'gamma', mean: 2, sd: 4, max_days: 30 }, // shape 0.25: mass piles up near 0
  { family: 'gamma', mean: 10, sd: 1, max_days: 14 },
  { family: 'lognormal', mean: 5, sd: 3, max_days: 21 },
  { family: 'lognormal', mean: 8, sd: 12, max_days: 10 }, // heavy tail cut at 10 days
  { family: 'gamma', mean: 0.5, sd: 0.3, max_days: 0 },
];

function referenceCdf(spec: DelaySpec): (x: number) => number {
  if (spec.family === 'gamma') {
    const [k, rate] = gammaParams(spec.mean, spec.sd);
    return (x) => gammaCdf(x, k, rate);
  }
  const [mu, sigma] = lognormalParams(spec.mean, spec.sd);
  return (x) => lognormalCdf(x, mu, sigma);
}

describe('delayCdf', () => {
  it('uses the distribution with the given mean and sd (checked by @stdlib moments)', () => {
    // @stdlib's own mean / variance of the parameters we derive (moment relations: common practice)
    const [k, rate] = gammaParams(5, 3);
    expect(gammaMean(k, rate)).toBeCloseTo(5, 13);
    expect(gammaVariance(k, rate)).toBeCloseTo(9, 12);
    const [mu, sigma] = lognormalParams(5, 3);
    expect(lognormalMean(mu, sigma)).toBeCloseTo(5, 13);
    expect(lognormalVariance(mu, sigma)).toBeCloseTo(9, 12);
    for (const spec of specs) {
      const F = delayCdf(spec);
      const G = referenceCdf(spec);
      for (const x of [0, 0.1, 0.5, 1, 2.5, 5, 7, 13, 21, 40]) expect(Math.abs(F(x) - G(x))).toBeLessThan(1e-15);
    }
  });
});

describe('discretiseDelay', () => {
  it('equals (F(d+1) - F(d)) / F(Dmax + 1) from @stdlib CDFs to 1e-14, and sums to 1', () => {
    // MODEL.md section 3: p_d = F(d+1) - F(d), d = 0..Dmax, renormalised; F from @stdlib
    for (const spec of specs) {
      const p = discretiseDelay(spec);
      const F = referenceCdf(spec);
      expect(p.length).toBe(spec.max_days + 1);
      const total = F(spec.max_days + 1);
      let s = 0;
      for (let d = 0; d <= spec.max_days; d++) {
        const ref = (F(d + 1) - F(d)) / total;
        expect(Math.abs(p[d] - ref)).toBeLessThan(1e-14);
        expect(p[d]).toBeGreaterThanOrEqual(0);
        s += p[d];
      }
      expect(Math.abs(s - 1)).toBeLessThan(1e-14);
    }
  });

  it('gives p_0 = 0.028603 for gamma, mean 5, sd 3, Dmax 21 (independent series for the CDF)', () => {
    // Regularised lower incomplete gamma by its power series,
    // P(a, x) = x^a e^-x / Gamma(a + 1) * sum_k x^k / ((a + 1) ... (a + k))
    // (Abramowitz and Stegun 1964, 6.5.29; from memory), independent of @stdlib.
    // (The @example in src/model/delay.ts says "about 0.0431"; the value is 0.0286029.)
    const [k, rate] = gammaParams(5, 3);
    const series = (x: number) => {
      let term = 1;
      let total = 1;
      for (let j = 1; j < 500; j++) {
        term *= x / (k + j);
        total += term;
      }
      const lgammaK1 = Math.log(k) + lnGammaLanczos(k); // ln Gamma(k + 1)
      return Math.exp(k * Math.log(x) - x - lgammaK1) * total;
    };
    expect(lnGammaLanczos(5)).toBeCloseTo(Math.log(24), 13); // Gamma(5) = 4!
    const expected = series(rate * 1) / series(rate * 22);
    const p = discretiseDelay({ family: 'gamma', mean: 5, sd: 3, max_days: 21 });
    expect(Math.abs(p[0] - expected)).toBeLessThan(1e-12);
    expect(p[0]).toBeCloseTo(0.0286029, 7);
  });

  it('rejects a non-positive mean or sd, or a bad max_days', () => {
    const base: DelaySpec = { family: 'gamma', mean: 5, sd: 3, max_days: 21 };
    expect(() => discretiseDelay({ ...base, mean: 0 })).toThrow(RangeError);
    expect(() => discretiseDelay({ ...base, sd: -1 })).toThrow(RangeError);
    expect(() => discretiseDelay({ ...base, sd: NaN })).toThrow(RangeError);
    expect(() => discretiseDelay({ ...base, max_days: 2.5 })).toThrow(RangeError);
    expect(() => discretiseDelay({ ...base, max_days: -1 })).toThrow(RangeError);
  });
});
