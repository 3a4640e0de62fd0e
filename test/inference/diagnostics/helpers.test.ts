import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { WaxwaneError } from '../../../src/errors.js';
import {
  autocovariance,
  drawsIssue,
  fold,
  meanAutocovarianceFft,
  meanAutocovariancePair,
  quantileOfSorted,
  rankNormalize,
  sortOrder,
  splitChains,
  splitRankings,
} from '../../../src/inference/diagnostics/helpers.js';
import { createRng } from '../../../src/util/rng.js';

const require = createRequire(import.meta.url);
// Reference normal quantile straight from @stdlib, not through the project's adapter.
const qnorm: (p: number, mu: number, sigma: number) => number = require(
  '@stdlib/stats/base/dists/normal/quantile',
);

const f64 = (...a: number[]) => Float64Array.from(a);
const plain = (chains: Float64Array[]) => chains.map((c) => Array.from(c));

/** Biased sample autocovariance straight from its definition, O(n^2). */
function directAutocovariance(x: Float64Array): Float64Array {
  const n = x.length;
  let m = 0;
  for (const v of x) m += v / n;
  const out = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    let s = 0;
    for (let i = 0; i + t < n; i++) s += (x[i]! - m) * (x[i + t]! - m);
    out[t] = s / n;
  }
  return out;
}

describe('splitChains', () => {
  it('cuts each chain into halves and drops the middle draw of an odd length', () => {
    // Split-chain rule: Vehtari et al. (2021); Gelman et al., BDA3, section 11.4.
    expect(plain(splitChains([f64(1, 2, 3, 4, 5), f64(6, 7, 8, 9, 10)]))).toEqual([
      [1, 2],
      [4, 5],
      [6, 7],
      [9, 10],
    ]);
    expect(plain(splitChains([f64(1, 2, 3, 4)]))).toEqual([
      [1, 2],
      [3, 4],
    ]);
  });

  it('copies rather than aliasing the input', () => {
    const chain = f64(1, 2, 3, 4);
    const [first] = splitChains([chain]);
    first![0] = 99;
    expect(chain[0]).toBe(1);
  });

  it('throws a WaxwaneError for chains of unequal length', () => {
    expect(() => splitChains([f64(1, 2, 3, 4), f64(1, 2, 3)])).toThrow(WaxwaneError);
    expect(() => splitChains([f64(1, 2, 3, 4), f64(1, 2, 3)])).toThrow(/equal length.*4, 3/);
  });
});

describe('rankNormalize', () => {
  it('gives tied draws their average rank and Blom scores from the normal quantile', () => {
    // Vehtari et al. (2021): z = Phi^-1((r - 3/8) / (S + 1/4)), fractional
    // ranks for ties. By hand: pooled draws 2, 5, 2, 7 have ranks 1.5, 3, 1.5, 4; S = 4.
    const z = rankNormalize([f64(2, 5), f64(2, 7)]);
    const score = (r: number) => qnorm((r - 0.375) / 4.25, 0, 1);
    expect(z[0]![0]).toBeCloseTo(score(1.5), 14);
    expect(z[0]![1]).toBeCloseTo(score(3), 14);
    expect(z[1]![0]).toBeCloseTo(score(1.5), 14);
    expect(z[1]![1]).toBeCloseTo(score(4), 14);
    // The values quoted in the TSDoc example.
    expect(z[0]![0]).toBeCloseTo(-0.6289, 4);
    expect(z[0]![1]).toBeCloseTo(0.2993, 4);
    expect(z[1]![1]).toBeCloseTo(1.0491, 4);
  });

  it('handles a block of four ties and a block of two', () => {
    // By hand: 1, 1, 1, 1 take ranks 1..4, average 2.5; 2, 2 take 5..6, average 5.5; S = 6.
    const z = rankNormalize([f64(1, 1, 2), f64(1, 2, 1)]);
    const low = qnorm((2.5 - 0.375) / 6.25, 0, 1);
    const high = qnorm((5.5 - 0.375) / 6.25, 0, 1);
    expect(z[0]![0]).toBeCloseTo(low, 14);
    expect(z[0]![1]).toBeCloseTo(low, 14);
    expect(z[0]![2]).toBeCloseTo(high, 14);
    expect(z[1]![0]).toBeCloseTo(low, 14);
    expect(z[1]![1]).toBeCloseTo(high, 14);
    expect(z[1]![2]).toBeCloseTo(low, 14);
  });

  it('is unchanged by a monotone transform of the draws', () => {
    // Rank invariance, Vehtari et al. (2021).
    const rng = createRng(11);
    const chains = [0, 1, 2].map(() => Float64Array.from({ length: 50 }, () => rng.normal()));
    const expd = chains.map((c) => c.map(Math.exp));
    expect(plain(rankNormalize(expd))).toEqual(plain(rankNormalize(chains)));
  });

  it('returns empty chains for no draws', () => {
    expect(rankNormalize([])).toEqual([]);
    expect(plain(rankNormalize([f64(), f64()]))).toEqual([[], []]);
  });

  it('returns NaN scores when a draw is NaN', () => {
    const z = rankNormalize([f64(1, NaN), f64(2, 3)]);
    expect(z.flatMap((c) => Array.from(c)).every(Number.isNaN)).toBe(true);
  });
});

describe('fold', () => {
  it('takes distances from the median of all draws', () => {
    // By hand: pooled 1, 2, 4, 9 has median 3 (the TSDoc example).
    expect(plain(fold([f64(1, 4), f64(2, 9)]))).toEqual([
      [2, 1],
      [1, 6],
    ]);
  });
});

describe('splitRankings', () => {
  it('agrees with rankNormalize of the split and of the folded split chains', () => {
    const rng = createRng(5);
    // Rounded draws, so that ties occur in the draws and in the folded draws (+ 0 turns the
    // -0 of Math.round into 0, which toEqual would tell apart).
    const chains = [0, 1, 2, 3].map(() =>
      Float64Array.from({ length: 41 }, () => Math.round(4 * rng.normal()) / 4 + 0),
    );
    const split = splitChains(chains);
    const r = splitRankings(chains);
    expect(plain(r.split)).toEqual(plain(split));
    expect(plain(r.ranked)).toEqual(plain(rankNormalize(split)));
    expect(plain(r.foldedRanked)).toEqual(plain(rankNormalize(fold(split))));
    expect(Array.from(r.sorted)).toEqual(split.flatMap((c) => Array.from(c)).sort((a, b) => a - b));
  });
});

describe('sortOrder', () => {
  it('sorts negatives, signed zeros, ties, subnormals and infinities like a comparison sort', () => {
    const rng = createRng(3);
    const values = Float64Array.from({ length: 2000 }, () => rng.normal() * 10 ** (6 * rng.uniform() - 3));
    values.set([-0, 0, 5e-324, -5e-324, Infinity, -Infinity, 1, 1, 1, -1, -1], 100);
    const order = sortOrder(values);
    expect(Array.from(order).sort((a, b) => a - b)).toEqual(Array.from(values.keys()));
    // Reference: the engine's numeric sort of a copy.
    const reference = Array.from(values).sort((a, b) => a - b);
    expect(Array.from(order, (i) => values[i]!)).toEqual(reference);
  });

  it('sorts draws packed within a relative 1e-9, which share their high 32 bits', () => {
    // Exercises the full 64-bit passes (the insertion finish gives up on these).
    const rng = createRng(4);
    const values = Float64Array.from({ length: 5000 }, () => 1000 * (1 + 1e-9 * rng.normal()));
    const order = sortOrder(values);
    const reference = Array.from(values).sort((a, b) => a - b);
    expect(Array.from(order, (i) => values[i]!)).toEqual(reference);
  });
});

describe('quantileOfSorted', () => {
  it('interpolates between order statistics (Hyndman and Fan definition 7)', () => {
    // By hand from h = (S - 1) p: S = 4, p = 0.05 -> h = 0.15 -> 1 + 0.15 (2 - 1) = 1.15.
    const x = f64(1, 2, 3, 4);
    expect(quantileOfSorted(x, 0.05)).toBeCloseTo(1.15, 14);
    expect(quantileOfSorted(x, 0.5)).toBe(2.5);
    expect(quantileOfSorted(x, 0.95)).toBeCloseTo(3.85, 14);
    expect(quantileOfSorted(x, 0)).toBe(1);
    expect(quantileOfSorted(x, 1)).toBe(4);
  });
});

describe('autocovariance', () => {
  it('matches the direct sum of its definition at every lag', () => {
    // Biased estimator c_t = (1/n) sum (x_i - xbar)(x_{i+t} - xbar) (Box and Jenkins, Time
    // Series Analysis; Geyer 1992): FFT result against the O(n^2) definition.
    const rng = createRng(7);
    for (const n of [1, 2, 3, 5, 8, 13, 100, 257, 1000]) {
      let v = 0;
      const x = Float64Array.from({ length: n }, () => (v = 0.8 * v + rng.normal()) + 3);
      const fast = autocovariance(x);
      const slow = directAutocovariance(x);
      expect(fast.length).toBe(n);
      for (let t = 0; t < n; t++) expect(Math.abs(fast[t]! - slow[t]!)).toBeLessThan(1e-10 * (1 + slow[0]!));
    }
  });

  it('averages over chains, by FFT up to a lag limit and directly two lags at a time', () => {
    const rng = createRng(8);
    for (const chains of [3, 4]) {
      const series = Array.from({ length: chains }, () =>
        Float64Array.from({ length: 301 }, () => rng.normal() + 2),
      );
      const means = series.map((x) => x.reduce((s, v) => s + v, 0) / x.length);
      const reference = new Float64Array(301);
      for (const x of series) directAutocovariance(x).forEach((v, t) => (reference[t] += v / chains));
      const limited = meanAutocovarianceFft(series, means, 80);
      expect(limited.length).toBe(81);
      for (let t = 0; t <= 80; t++) expect(Math.abs(limited[t]! - reference[t]!)).toBeLessThan(1e-12);
      for (const lag of [0, 1, 6, 299, 300]) {
        const [a, b] = meanAutocovariancePair(series, means, lag);
        expect(Math.abs(a - reference[lag]!)).toBeLessThan(1e-12);
        expect(Math.abs(b - (lag + 1 < 301 ? reference[lag + 1]! : 0))).toBeLessThan(1e-12);
      }
    }
  });
});

describe('drawsIssue', () => {
  const eight = f64(1, 2, 3, 4, 5, 6, 7, 8);
  it('names the reason a diagnostic is NaN', () => {
    expect(drawsIssue([])).toBe('too-few-draws');
    expect(drawsIssue([f64(1, 2, 3, 4, 5, 6, 7)])).toBe('too-few-draws');
    expect(drawsIssue([eight, eight.map((v) => (v === 3 ? NaN : v))])).toBe('non-finite');
    expect(drawsIssue([eight, eight.map((v) => (v === 3 ? -Infinity : v))])).toBe('non-finite');
    expect(drawsIssue([eight.map(() => 2), eight.map(() => 2)])).toBe('constant');
    expect(drawsIssue([eight, eight])).toBeUndefined();
    expect(drawsIssue([f64(1, 2, 3, 4)], 4)).toBeUndefined();
  });
});
