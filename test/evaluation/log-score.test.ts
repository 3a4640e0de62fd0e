import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { negBinMixtureLogScore } from '../../src/evaluation/log-score.js';

const require = createRequire(import.meta.url);
// @stdlib's negative binomial counts failures before the r-th success with success probability p:
// mean r (1 - p) / p, so mean mu and dispersion phi are r = phi, p = phi / (phi + mu)
const nbinomPmf = require('@stdlib/stats/base/dists/negative-binomial/pmf') as (y: number, r: number, p: number) => number;
const gammaln = require('@stdlib/math/base/special/gammaln') as (x: number) => number;
const pmf = (y: number, mu: number, phi: number) => nbinomPmf(y, phi, phi / (phi + mu));

describe('negBinMixtureLogScore', () => {
  it('is -ln pmf for one draw (@stdlib negative-binomial pmf)', () => {
    for (const [y, mu, phi] of [[0, 3, 2], [7, 5.5, 10], [40, 12, 0.8], [3, 3, 1e6]] as const) {
      expect(negBinMixtureLogScore(y, [mu], [phi])).toBeCloseTo(-Math.log(pmf(y, mu, phi)), 9);
    }
  });

  it('is -ln of the mean pmf over draws (the mixture; @stdlib pmf)', () => {
    const mu = [4, 9.5, 20, 2.2];
    const phi = [3, 50, 1.5, 8];
    for (const y of [0, 3, 10, 25]) {
      const mean = mu.reduce((a, m, d) => a + pmf(y, m, phi[d]!), 0) / mu.length;
      expect(negBinMixtureLogScore(y, mu, phi)).toBeCloseTo(-Math.log(mean), 9);
    }
  });

  it('stays finite far in the tail, where the pmf underflows to 0', () => {
    const y = 5000;
    expect(pmf(y, 10, 50)).toBe(0);
    // the NB2 log pmf written out (Cameron and Trivedi 1998, section 3.3, from memory) with @stdlib's gammaln
    const lp = gammaln(y + 50) - gammaln(50) - gammaln(y + 1) + 50 * Math.log(50 / 60) + y * Math.log(10 / 60);
    expect(lp).toBeLessThan(-745); // e^lp is below the smallest double
    expect(negBinMixtureLogScore(y, [10, 10], [50, 50])).toBeCloseTo(-lp, 6);
  });

  it('leaves out NaN draws; NaN when none is left; Infinity when no draw allows the outcome', () => {
    expect(negBinMixtureLogScore(2, [NaN, 3], [5, 5])).toBeCloseTo(-Math.log(pmf(2, 3, 5)), 9);
    expect(negBinMixtureLogScore(2, [NaN], [5])).toBeNaN();
    expect(negBinMixtureLogScore(NaN, [3], [5])).toBeNaN();
    expect(negBinMixtureLogScore(2, [0, 0], [5, 5])).toBe(Infinity); // a mean of 0 allows only 0
  });
});
