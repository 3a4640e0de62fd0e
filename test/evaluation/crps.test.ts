import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { crpsFromSamples, crpsSorted } from '../../src/evaluation/crps.js';
import { createRng } from '../../src/util/rng.js';

const require = createRequire(import.meta.url);
const normalCdf = require('@stdlib/stats/base/dists/normal/cdf') as (x: number, mu: number, sigma: number) => number;
const normalPdf = require('@stdlib/stats/base/dists/normal/pdf') as (x: number, mu: number, sigma: number) => number;

/**
 * CRPS of Normal(0, 1) at y in closed form: y (2 Phi(y) - 1) + 2 phi(y) - 1/sqrt(pi)
 * (Gneiting and Raftery 2007, JASA 102(477), section 4.2; Phi and phi from @stdlib).
 */
function crpsStandardNormal(y: number): number {
  return y * (2 * normalCdf(y, 0, 1) - 1) + 2 * normalPdf(y, 0, 1) - 1 / Math.sqrt(Math.PI);
}

/** The definition E|X - y| - E|X - X'| / 2 over every pair, O(n^2) (Gneiting and Raftery 2007, equation 21). */
function crpsByPairs(x: readonly number[], y: number): number {
  const n = x.length;
  let a = 0;
  let b = 0;
  for (let i = 0; i < n; i++) {
    a += Math.abs(x[i]! - y);
    for (let j = 0; j < n; j++) b += Math.abs(x[i]! - x[j]!);
  }
  return a / n - b / (2 * n * n);
}

describe('crpsSorted', () => {
  it('gives 1/4 for the samples {0, 1} at 0 (hand-worked: E|X - 0| = 1/2, E|X - X\'| = 1/2)', () => {
    expect(crpsSorted([0, 1], 0)).toBe(0.25);
  });

  it('is the absolute error for a single sample (a point forecast; Gneiting and Raftery 2007, section 4.2)', () => {
    expect(crpsSorted([3], 7.5)).toBe(4.5);
  });

  it('equals the pairwise definition on unsorted samples with ties', () => {
    const rng = createRng(5);
    const x = Array.from({ length: 57 }, () => Math.round(10 * rng.normal()));
    for (const y of [-12, 0, 0.5, 3, 40]) expect(crpsFromSamples(x, y)).toBeCloseTo(crpsByPairs(x, y), 12);
  });

  it('of 100,000 draws from Normal(0, 1) matches the closed form within Monte Carlo error', () => {
    const rng = createRng(20070301);
    const n = 100_000;
    const sorted = Float64Array.from({ length: n }, () => rng.normal()).sort();
    for (const y of [-2.5, -0.7, 0, 0.3, 1.9]) {
      // the score is a mean of n terms each with sd below 1 (|X - y| and the spread term of a
      // standard normal), so its Monte Carlo sd is below 1/sqrt(n); 4 of those is the tolerance
      expect(Math.abs(crpsSorted(sorted, y) - crpsStandardNormal(y))).toBeLessThan(4 / Math.sqrt(n));
    }
  });

  it('gives NaN without samples or for a NaN outcome', () => {
    expect(crpsSorted([], 1)).toBeNaN();
    expect(crpsSorted([1, 2], NaN)).toBeNaN();
  });
});
