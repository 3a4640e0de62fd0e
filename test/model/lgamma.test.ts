import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { logGamma, LOG_GAMMA_SERIES_FROM, LOG_GAMMA_SERIES_TO } from '../../src/model/lgamma.js';

// Reference straight from @stdlib (a general-purpose library), not through the project.
const require = createRequire(import.meta.url);
const stdlibGammaln: (x: number) => number = require('@stdlib/math/base/special/gammaln');

const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('logGamma', () => {
  it('equals @stdlib gammaln to 1e-14 relative for y + phi, phi in (1e-3, 1e8), y a count', () => {
    // the range the negative-binomial likelihood uses (lnG(y + phi) for y > 0)
    const phis = [1.1e-3, 0.01, 0.37, 1, 2.5, 9.99, 10, 20, 137.5, 1e3, 5.5e4, 1e6, 3e7, 9.9e7];
    const ys = [1, 2, 3, 5, 9, 10, 17, 100, 1234, 1e5, 1e6];
    let compared = 0;
    for (const phi of phis) {
      for (const y of ys) {
        const x = y + phi;
        const ref = stdlibGammaln(x);
        if (x < LOG_GAMMA_SERIES_FROM) {
          expect(logGamma(x)).toBe(ref); // handed to @stdlib itself
        } else {
          expect(relErr(logGamma(x), ref)).toBeLessThan(1e-14);
          compared++;
        }
      }
    }
    expect(compared).toBeGreaterThan(100);
  });

  it('equals @stdlib gammaln to 1e-14 relative on a dense log-spaced grid from 10 to 1e9', () => {
    let worst = 0;
    for (let i = 0; i <= 20000; i++) {
      const x = 10 * Math.pow(1e8, i / 20000) * (1 + 1e-7 * (i % 7));
      worst = Math.max(worst, relErr(logGamma(x), stdlibGammaln(x)));
    }
    // observed: about 4e-16 (2 ulp); a wrong series coefficient down to B_10's shows above 2e-15
    expect(worst).toBeLessThan(2e-15);
  });

  it('gives ln((n-1)!) at integers and the half-integer values from Gamma(n + 1/2)', () => {
    // 19! = 121645100408832000 is exact in a double (its odd part is below 2^53)
    expect(relErr(logGamma(20), Math.log(121645100408832000))).toBeLessThan(1e-15);
    expect(logGamma(20)).toBeCloseTo(39.339884187199495, 13);
    // ln((n-1)!) as a sum of logs, n = 10..170
    let lnFact = 0;
    for (let k = 2; k <= 8; k++) lnFact += Math.log(k);
    for (let n = 10; n <= 170; n++) {
      lnFact += Math.log(n - 1);
      expect(relErr(logGamma(n), lnFact)).toBeLessThan(1e-14);
    }
    // Gamma(n + 1/2) = (2n)! / (4^n n!) sqrt(pi) (Abramowitz and Stegun 1964, 6.1.12):
    // n = 10: 654729075 / 1024 * sqrt(pi)
    const ref = Math.log(654729075) - 10 * Math.LN2 + 0.5 * Math.log(Math.PI);
    expect(relErr(logGamma(10.5), ref)).toBeLessThan(1e-14);
  });

  it('hands the rest of the line to @stdlib gammaln: below 10, huge, zero, negative, NaN', () => {
    const others = [1e-300, 1e-3, 0.5, 1, 1.5, 2, 3.3, 9.999999, LOG_GAMMA_SERIES_TO, 1e300, Infinity, 0, -2.5, -3, NaN];
    for (const x of others) {
      expect(Object.is(logGamma(x), stdlibGammaln(x))).toBe(true);
    }
  });
});
