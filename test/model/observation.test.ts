import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { convolveDelay, observations, negBinLogPmf, negBinLogLikelihood } from '../../src/model/observation.js';

// Reference functions straight from @stdlib (a general-purpose library), not through the project.
const require = createRequire(import.meta.url);
/** @stdlib negative-binomial log pmf: x failures before the r-th success, success probability p. */
const stdlibNegBinLogPmf: (x: number, r: number, p: number) => number = require(
  '@stdlib/stats/base/dists/negative-binomial/logpmf',
);
const stdlibGammaln: (x: number) => number = require('@stdlib/math/base/special/gammaln');

const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

const GRID_Y = [0, 1, 2, 5, 17, 100, 1234, 1e5, 1e6];
const GRID_MU = [1e-3, 0.5, 1, 3.7, 50, 1000, 2.5e4, 1e6];
const GRID_PHI = [0.01, 0.3, 1, 5, 80, 1e3, 1e6];

/**
 * 50-digit values of lnG(y + phi) - lnG(phi) - lnG(y + 1) + phi ln(phi/(phi + mu)) + y ln(mu/(phi + mu)),
 * made with mpmath 1.3.0 under Python 3 (mp.dps = 50) on 2026-12-02 by:
 *   lp = lambda y, mu, phi: (mp.loggamma(y + phi) - mp.loggamma(phi) - mp.loggamma(y + 1)
 *        + phi * mp.log(phi / (phi + mu)) + y * mp.log(mu / (phi + mu)))
 *   print(mp.nstr(lp(mp.mpf(y), mp.mpf(mu), mp.mpf(phi)), 17))
 * for the cells where @stdlib cannot serve as the reference: p = phi/(phi + mu) within 1e-5 of 1
 * (@stdlib forms 1 - p from p, losing up to 1e-7 relative; observed), or a pmf below the
 * normal double range (@stdlib works with the pmf itself, then takes its log: -Infinity, or a
 * subnormal off by up to 6e-5 relative at y = 2, mu = 1e6, phi = 80; observed).
 */
const GOLDEN: Array<[number, number, number, number]> = [
  [0, 0.001, 1e6, -0.00099999999950000002],
  [0, 3.7, 1e6, -3.6999931550168845],
  [1, 1, 1e6, -1.0000004999998333],
  [2, 3.7, 1e6, -1.7764810962632822],
  [17, 3.7, 1e6, -14.963335571732363],
  [1e6, 1e6, 1e6, -8.1732675274667824],
  [1e6, 1e6, 0.01, -18.471042142866178],
  [1e6, 1e6, 80, -12.544517433480319],
  [1e6, 2.5e4, 0.01, -18.824153272275059],
  [2, 1e6, 80, -746.60194499205902],
  [5, 1e6, 80, -737.44015289077747],
  [1234, 0.001, 5, -10485.162068548572],
  [1e5, 0.5, 0.3, -47009.812020219755],
];

/** Where @stdlib's logpmf is an exact reference: its pmf is a normal double and 1 - p keeps its digits. */
function stdlibUsable(y: number, mu: number, phi: number): boolean {
  const ref = stdlibNegBinLogPmf(y, phi, phi / (phi + mu));
  return ref > -708 && mu / phi >= 1e-5;
}

describe('negBinLogPmf', () => {
  it('equals @stdlib negative-binomial logpmf (r = phi, p = phi/(phi+mu)) over the grid to 1e-10 relative', () => {
    // NB2 with mean mu and dispersion phi is @stdlib's failures-before-r-th-success
    // distribution with r = phi, p = phi/(phi + mu) (Cameron and Trivedi 1998, 3.3; common practice)
    const failures: string[] = [];
    let compared = 0;
    for (const y of GRID_Y) {
      for (const mu of GRID_MU) {
        for (const phi of GRID_PHI) {
          if (!stdlibUsable(y, mu, phi)) continue;
          compared++;
          const ref = stdlibNegBinLogPmf(y, phi, phi / (phi + mu));
          const e = relErr(negBinLogPmf(y, mu, phi), ref);
          if (!(e <= 1e-10)) failures.push(`y=${y} mu=${mu} phi=${phi}: rel err ${e.toExponential(2)}`);
        }
      }
    }
    expect(compared).toBeGreaterThan(250); // most of the 504 cells
    expect(failures).toEqual([]);
  });

  it('equals 50-digit values where @stdlib cannot serve (phi 1e6, y 1e6, far tails) to 1e-10 relative', () => {
    const failures: string[] = [];
    for (const [y, mu, phi, ref] of GOLDEN) {
      const e = relErr(negBinLogPmf(y, mu, phi), ref);
      if (!(e <= 1e-10)) failures.push(`y=${y} mu=${mu} phi=${phi}: rel err ${e.toExponential(2)}`);
    }
    expect(failures).toEqual([]);
  });

  it('is within 1e-8 absolute of the 50-digit values everywhere above (what a sampler needs)', () => {
    // a weaker, absolute bound: log densities enter Metropolis ratios as differences
    for (const [y, mu, phi, ref] of GOLDEN) expect(Math.abs(negBinLogPmf(y, mu, phi) - ref)).toBeLessThan(1e-8);
  });

  it('handles the edges of the support and is total (never NaN)', () => {
    // y = 0: (phi/(phi+mu))^phi (the NB2 pmf at 0; Cameron and Trivedi 1998, 3.3)
    expect(negBinLogPmf(0, 2, 3)).toBeCloseTo(3 * Math.log(3 / 5), 14);
    expect(negBinLogPmf(0, 0, 3)).toBe(0); // mu = 0: all mass at 0
    expect(negBinLogPmf(4, 0, 3)).toBe(-Infinity);
    for (const [y, mu, phi] of [
      [1, 2, 0],
      [1, 2, -1],
      [-1, 2, 3],
      [1, -2, 3],
      [NaN, 2, 3],
      [1, NaN, 3],
      [1, 2, NaN],
      [1, Infinity, 3],
      [Infinity, 2, 3],
      [1, 2, Infinity],
    ]) {
      expect(negBinLogPmf(y, mu, phi)).toBe(-Infinity);
    }
    // the pmf sums to 1 over y (mu = 7.5, phi = 2.2; tail beyond 400 is below 1e-30)
    let total = 0;
    for (let y = 0; y <= 400; y++) total += Math.exp(negBinLogPmf(y, 7.5, 2.2));
    expect(total).toBeCloseTo(1, 13);
  });
});

describe('convolveDelay', () => {
  it('computes mu[t] = sum_d p[d] onsets[offset + t - d], zero before the series (hand values)', () => {
    const p = Float64Array.from([0.5, 0.3, 0.2]);
    const onsets = Float64Array.from([1, 2, 3, 4, 5, 6]);
    const mu = new Float64Array(4).fill(NaN);
    convolveDelay(p, onsets, 2, 0, 4, mu);
    // t=0: .5*3 + .3*2 + .2*1; t=1: .5*4 + .3*3 + .2*2; t=2: .5*5+.3*4+.2*3; t=3: .5*6+.3*5+.2*4
    expect(Array.from(mu).map((v) => +v.toFixed(12))).toEqual([2.3, 3.3, 4.3, 5.3]);
    const mu0 = new Float64Array(3).fill(NaN);
    convolveDelay(p, onsets, 0, 0, 3, mu0);
    // onsets before index 0 count as zero: t=0: .5*1; t=1: .5*2 + .3*1; t=2: .5*3+.3*2+.2*1
    expect(Array.from(mu0).map((v) => +v.toFixed(12))).toEqual([0.5, 1.3, 2.3]);
    // from/to: only [1, 3) is written
    const part = new Float64Array(4).fill(-1);
    convolveDelay(p, onsets, 2, 1, 3, part);
    expect(part[0]).toBe(-1);
    expect(part[3]).toBe(-1);
    expect(part[1]).toBeCloseTo(3.3, 12);
  });

  it('keeps total mass when the delay pmf sums to 1 (a convolution with a pmf)', () => {
    const p = Float64Array.from([0.1, 0.2, 0.4, 0.2, 0.1]);
    const onsets = new Float64Array(50);
    for (let s = 0; s < 20; s++) onsets[s] = (s * 37) % 11;
    const mu = new Float64Array(50);
    convolveDelay(p, onsets, 0, 0, 50, mu);
    let a = 0;
    let b = 0;
    for (let s = 0; s < 50; s++) {
      a += onsets[s];
      b += mu[s];
    }
    expect(b).toBeCloseTo(a, 12);
  });
});

describe('observations', () => {
  it('keeps the non-missing days, their counts and sum ln(y!)', () => {
    const obs = observations([3, NaN, 0, 5, NaN, 1]);
    expect(Array.from(obs.index)).toEqual([0, 2, 3, 5]);
    expect(Array.from(obs.counts)).toEqual([3, 0, 5, 1]);
    expect(obs.days).toBe(6);
    // ln 3! + ln 0! + ln 5! + ln 1! = ln 6 + ln 120
    expect(obs.sumLgammaY1).toBeCloseTo(Math.log(720), 13);
  });
});

describe('negBinLogLikelihood', () => {
  const T = 60;
  const counts: number[] = [];
  const delayed = new Float64Array(T);
  for (let t = 0; t < T; t++) {
    delayed[t] = 40 + 30 * Math.sin(t / 6) + t;
    counts.push((t * 7919) % 53);
  }
  counts[3] = NaN;
  counts[17] = NaN;
  counts[40] = NaN;
  counts[9] = 0;
  const obs = observations(counts);
  const weekdayOfDay = new Uint8Array(T);
  for (let t = 0; t < T; t++) weekdayOfDay[t] = (t + 3) % 7;
  const v = [0.1, -0.05, 0.2, 0, -0.15, 0.3];
  const weekday = Float64Array.from([...v, -v.reduce((a, b) => a + b)].map(Math.exp));

  /** Plain sum of negBinLogPmf over the observed days (NaN = missing contributes nothing). */
  function direct(rho: number, phi: number, wd: Float64Array | null): number {
    let s = 0;
    for (let t = 0; t < T; t++) {
      if (Number.isNaN(counts[t])) continue;
      const m = rho * delayed[t] * (wd === null ? 1 : wd[weekdayOfDay[t]]);
      s += negBinLogPmf(counts[t], m, phi);
    }
    return s;
  }

  it('equals the sum of negBinLogPmf over observed days, with and without weekday multipliers', () => {
    for (const phi of [0.4, 8, 300]) {
      for (const rho of [0.05, 0.6]) {
        const plain = negBinLogLikelihood(obs, delayed, rho, null, null, phi);
        expect(relErr(plain, direct(rho, phi, null))).toBeLessThan(1e-12);
        const withWd = negBinLogLikelihood(obs, delayed, rho, weekday, weekdayOfDay, phi);
        expect(relErr(withWd, direct(rho, phi, weekday))).toBeLessThan(1e-12);
        expect(withWd).not.toBe(plain);
      }
    }
  });

  it('does not read the expected counts of missing days', () => {
    const poisoned = Float64Array.from(delayed);
    poisoned[3] = NaN;
    poisoned[17] = -5;
    poisoned[40] = Infinity;
    const a = negBinLogLikelihood(obs, poisoned, 0.3, weekday, weekdayOfDay, 5);
    const b = negBinLogLikelihood(obs, delayed, 0.3, weekday, weekdayOfDay, 5);
    expect(a).toBe(b);
    expect(Number.isFinite(a)).toBe(true);
  });

  it('gives 0 for an all-missing series and -Infinity for a positive count with mu = 0', () => {
    const none = observations([NaN, NaN]);
    expect(negBinLogLikelihood(none, new Float64Array(2), 0.5, null, null, 3)).toBe(0);
    const one = observations([0, 4]);
    expect(negBinLogLikelihood(one, Float64Array.from([0, 0]), 0.5, null, null, 3)).toBe(-Infinity);
    // y = 0 with mu = 0 contributes exactly 0
    const zero = observations([0]);
    expect(negBinLogLikelihood(zero, Float64Array.from([0]), 0.5, null, null, 3)).toBeCloseTo(0, 14);
  });

  it('uses the same ln(y!) as @stdlib gammaln', () => {
    let s = 0;
    for (const y of obs.counts) s += stdlibGammaln(y + 1);
    expect(relErr(obs.sumLgammaY1, s)).toBeLessThan(1e-15);
  });
});
