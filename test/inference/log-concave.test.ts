// The log-concave integrator against closed forms: the Gaussian integral, the generalised
// inverse Gaussian normalising constant (Bessel K of half-integer order, DLMF 10.49.12 /
// Abramowitz and Stegun 10.2.15), and the Gumbel distribution's log density and CDF through
// @stdlib's reference implementation.
import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { createLogConcaveIntegrator } from '../../src/inference/log-concave.js';
import { createRng } from '../../src/util/rng.js';

const require = createRequire(import.meta.url);
const gumbelCdf: (x: number, mu: number, beta: number) => number = require('@stdlib/stats/base/dists/gumbel/cdf');
const normalCdf: (x: number, mu: number, s: number) => number = require('@stdlib/stats/base/dists/normal/cdf');

/** Kolmogorov-Smirnov statistic of sorted draws against a CDF. */
function ksStatistic(sorted: Float64Array, cdf: (x: number) => number): number {
  let d = 0;
  const n = sorted.length;
  for (let i = 0; i < n; i++) {
    const f = cdf(sorted[i]!);
    d = Math.max(d, Math.abs(f - i / n), Math.abs(f - (i + 1) / n));
  }
  return d;
}

describe('createLogConcaveIntegrator().logIntegral', () => {
  it('integrates a Gaussian exactly: log of the integral of exp(-(u - m)^2 / (2 s^2)) is log(s sqrt(2 pi))', () => {
    const ig = createLogConcaveIntegrator();
    for (const [m, s, guess] of [
      [0, 1, 0],
      [3, 0.01, 2.9],
      [-5, 40, 100],
    ] as const) {
      const v = ig.logIntegral((u) => -((u - m) ** 2) / (2 * s * s), guess, 1);
      expect(v).toBeCloseTo(Math.log(s * Math.sqrt(2 * Math.PI)), 12);
    }
  });

  it('gives the generalised inverse Gaussian constant for the walk-scale factor with a half-normal prior', () => {
    // integral over u of halfnormal_s(e^u) e^u e^(-n u) exp(-S2 e^(-2u) / 2)
    //   = (2 / (s sqrt(2 pi))) (1/2) integral v^(-(n+1)/2) exp(-(v / s^2 + S2 / v) / 2) dv
    //   = (1 / (s sqrt(2 pi))) 2 (S2 s^2)^(p/2) K_|p|(sqrt(S2) / s),  p = (1 - n) / 2
    // (GIG normalising constant: Joergensen 1982, "Statistical properties of the generalized
    // inverse Gaussian distribution", Springer, LNS vol. 9, eq. 2.2, from memory);
    // n = 4 gives K_{3/2}(x) = sqrt(pi / (2x)) e^-x (1 + 1/x) (DLMF 10.49.12).
    const ig = createLogConcaveIntegrator();
    for (const [s, S2] of [
      [0.15, 0.09],
      [0.05, 0.4],
      [1, 0.001],
    ] as const) {
      const n = 4;
      const g = (u: number) => Math.log(2 / (s * Math.sqrt(2 * Math.PI))) - Math.exp(2 * u) / (2 * s * s) + u - n * u - 0.5 * S2 * Math.exp(-2 * u);
      const x = Math.sqrt(S2) / s;
      const k32 = Math.sqrt(Math.PI / (2 * x)) * Math.exp(-x) * (1 + 1 / x);
      const logZ = Math.log(2 / (s * Math.sqrt(2 * Math.PI))) + (-1.5 / 2) * Math.log(S2 * s * s) + Math.log(k32);
      expect(Math.abs(ig.logIntegral(g, 0.5 * Math.log(S2 / n), 0.3) - logZ)).toBeLessThan(1e-12);
    }
  });

  it('integrates the Gumbel density to 1 (log 0), a skewed log-concave density', () => {
    // Gumbel(0, 1): log f(x) = -x - e^-x (Johnson, Kotz and Balakrishnan, vol. 2, ch. 22)
    const ig = createLogConcaveIntegrator();
    // analytic for |Im x| < pi / 2, so the step is bounded by 0.1 (log-concave.ts remarks)
    expect(Math.abs(ig.logIntegral((x) => -x - Math.exp(-x), 5, 0.1, 0.1))).toBeLessThan(1e-13);
    expect(Math.abs(ig.logIntegral((x) => -x - Math.exp(-x), -30, 3, 0.1))).toBeLessThan(1e-13);
  });

  it('returns NaN when the function is not finite at the guess', () => {
    const ig = createLogConcaveIntegrator();
    expect(ig.logIntegral((u) => (u > 0 ? -u * u : -Infinity), -1, 1)).toBeNaN();
    expect(() => ig.sample(createRng(1))).toThrow();
  });
});

describe('createLogConcaveIntegrator().sample', () => {
  it('draws exactly from the Gumbel distribution (Kolmogorov-Smirnov against @stdlib gumbel cdf)', () => {
    const ig = createLogConcaveIntegrator();
    ig.logIntegral((x) => -x - Math.exp(-x), 0, 1);
    const rng = createRng(7);
    const n = 20000;
    const draws = new Float64Array(n);
    for (let i = 0; i < n; i++) draws[i] = ig.sample(rng);
    draws.sort();
    // 1% critical value of the one-sample KS statistic: 1.63 / sqrt(n) (Massey 1951, JASA 46(253))
    expect(ksStatistic(draws, (x) => gumbelCdf(x, 0, 1))).toBeLessThan(1.63 / Math.sqrt(n));
  });

  it('draws from a narrow Gaussian far from zero, tails included (Kolmogorov-Smirnov against @stdlib normal cdf)', () => {
    const ig = createLogConcaveIntegrator();
    ig.logIntegral((u) => -((u - 10) ** 2) / (2 * 0.02 * 0.02), 0, 1);
    const rng = createRng(8);
    const n = 20000;
    const draws = new Float64Array(n);
    for (let i = 0; i < n; i++) draws[i] = ig.sample(rng);
    draws.sort();
    expect(ksStatistic(draws, (x) => normalCdf(x, 10, 0.02))).toBeLessThan(1.63 / Math.sqrt(n));
  });

  it('replays the same draws from the same seed', () => {
    const ig = createLogConcaveIntegrator();
    ig.logIntegral((x) => -x - Math.exp(-x), 0, 1);
    const a = createRng(3);
    const b = createRng(3);
    for (let i = 0; i < 100; i++) expect(ig.sample(a)).toBe(ig.sample(b));
  });
});
