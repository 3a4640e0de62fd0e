import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { intervalScore, weightedIntervalScore, wisFromSorted, WIS_ALPHAS } from '../../src/evaluation/interval-score.js';

const require = createRequire(import.meta.url);
const normalCdf = require('@stdlib/stats/base/dists/normal/cdf') as (x: number, mu: number, sigma: number) => number;
const normalPdf = require('@stdlib/stats/base/dists/normal/pdf') as (x: number, mu: number, sigma: number) => number;
const normalQuantile = require('@stdlib/stats/base/dists/normal/quantile') as (p: number, mu: number, sigma: number) => number;

/** CRPS of Normal(0, 1) at y (Gneiting and Raftery 2007, section 4.2). */
const crpsStandardNormal = (y: number) => y * (2 * normalCdf(y, 0, 1) - 1) + 2 * normalPdf(y, 0, 1) - 1 / Math.sqrt(Math.PI);

/**
 * WIS of Normal(0, 1) with K central intervals whose 2K + 1 quantile levels are the midpoints
 * (j - 1/2) / (2K + 1), j = 1..2K+1: alpha_k = (2k - 1) / (2K + 1).
 */
function wisNormal(K: number, y: number): number {
  const intervals = Array.from({ length: K }, (_, i) => {
    const alpha = (2 * (i + 1) - 1) / (2 * K + 1);
    return { alpha, lower: normalQuantile(alpha / 2, 0, 1), upper: normalQuantile(1 - alpha / 2, 0, 1) };
  });
  return weightedIntervalScore(0, intervals, y);
}

describe('intervalScore (Bracher et al. 2021, equation 1)', () => {
  it('is the width when the outcome falls inside', () => {
    expect(intervalScore(8, 13, 10, 0.5)).toBe(5);
  });

  it('adds 2/alpha times the miss (hand-worked)', () => {
    // [8, 13] at alpha 0.5, y = 22: 5 + (2 / 0.5) x 9 = 41; [5, 20] at alpha 0.1, y = 2: 15 + 20 x 3 = 75
    expect(intervalScore(8, 13, 22, 0.5)).toBe(41);
    expect(intervalScore(5, 20, 2, 0.1)).toBeCloseTo(75, 12);
  });
});

describe('weightedIntervalScore (Bracher et al. 2021, equation 2)', () => {
  it('matches a hand-worked example', () => {
    // median 10, 50% interval [8, 13], 90% interval [5, 20], outcome 22:
    // w0 |y - m| = 0.5 x 12 = 6; (0.5/2) IS_0.5 = 0.25 x 41 = 10.25; (0.1/2) IS_0.1 = 0.05 x (15 + 20 x 2) = 2.75;
    // WIS = (6 + 10.25 + 2.75) / (2 + 1/2) = 19 / 2.5 = 7.6
    const wis = weightedIntervalScore(10, [
      { alpha: 0.5, lower: 8, upper: 13 },
      { alpha: 0.1, lower: 5, upper: 20 },
    ], 22);
    expect(wis).toBeCloseTo(7.6, 12);
  });

  it('is the absolute error of the median without intervals (K = 0; Bracher et al. 2021, section 2.2)', () => {
    expect(weightedIntervalScore(4, [], 9)).toBe(5);
  });

  it('approaches the CRPS as the quantile levels get dense (Bracher et al. 2021, section 2.2)', () => {
    for (const y of [-1.8, 0, 0.4, 2.6]) {
      const target = crpsStandardNormal(y);
      const errors = [2, 10, 50, 250].map((K) => Math.abs(wisNormal(K, y) - target));
      // the midpoint rule's error shrinks with the number of levels (about as 1/K^2 away from y)
      for (let i = 1; i < errors.length; i++) expect(errors[i]!).toBeLessThan(errors[i - 1]!);
      expect(errors[errors.length - 1]!).toBeLessThan(1e-4 * Math.max(1, target));
    }
  });
});

describe('wisFromSorted', () => {
  it('takes the median and intervals as type-7 sample quantiles', () => {
    const sorted = Float64Array.from({ length: 101 }, (_, i) => i); // quantile p is 100 p exactly
    const intervals = [0.2, 0.5].map((alpha) => ({ alpha, lower: 100 * (alpha / 2), upper: 100 * (1 - alpha / 2) }));
    expect(wisFromSorted(sorted, 95, [0.2, 0.5])).toBeCloseTo(weightedIntervalScore(50, intervals, 95), 12);
  });

  it('of many samples from a normal forecast is the WIS of its exact quantiles', () => {
    const sorted = Float64Array.from({ length: 20001 }, (_, i) => normalQuantile((i + 0.5) / 20001, 0, 1));
    for (const y of [-1, 0.2, 2]) {
      const exact = weightedIntervalScore(0, WIS_ALPHAS.map((alpha) => ({ alpha, lower: normalQuantile(alpha / 2, 0, 1), upper: normalQuantile(1 - alpha / 2, 0, 1) })), y);
      expect(wisFromSorted(sorted, y)).toBeCloseTo(exact, 3);
    }
  });

  it('gives NaN without samples or outcome', () => {
    expect(wisFromSorted([], 1)).toBeNaN();
    expect(wisFromSorted([1, 2, 3], NaN)).toBeNaN();
  });
});
