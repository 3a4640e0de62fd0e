import { describe, it, expect } from 'vitest';
import { createRequire } from 'node:module';
import { rankHistogram, rankOf, thinEvenly, uniformityTest } from '../../src/evaluation/ranks.js';
import { createRng } from '../../src/util/rng.js';

const require = createRequire(import.meta.url);
const chisqQuantile = require('@stdlib/stats/base/dists/chisquare/quantile') as (p: number, k: number) => number;

describe('rankOf', () => {
  it('counts the draws below the truth', () => {
    const rng = createRng(1);
    expect(rankOf(2.5, [1, 2, 3, 4], rng)).toBe(2);
    expect(rankOf(0, [1, 2, 3, 4], rng)).toBe(0);
    expect(rankOf(9, [1, 2, 3, 4], rng)).toBe(4);
    expect(rankOf(NaN, [1], rng)).toBeNaN();
    expect(rankOf(1, [NaN, 2], rng)).toBeNaN();
  });

  it('breaks ties uniformly at random (Talts et al. 2018, section 4.1)', () => {
    const rng = createRng(2);
    const counts = [0, 0, 0, 0];
    // truth 5 among [1, 5, 5, 9]: one below, two equal, so the rank is 1, 2 or 3, each with probability 1/3
    for (let i = 0; i < 30000; i++) counts[rankOf(5, [1, 5, 5, 9], rng)]!++;
    expect(counts[0]).toBe(0);
    for (const k of [1, 2, 3]) expect(Math.abs(counts[k]! / 30000 - 1 / 3)).toBeLessThan(0.015);
  });
});

describe('thinEvenly', () => {
  it('spreads the picks over all draws', () => {
    expect(thinEvenly(10, 5)).toEqual([1, 3, 5, 7, 9]);
    expect(thinEvenly(4, 4)).toEqual([0, 1, 2, 3]);
    expect(() => thinEvenly(3, 4)).toThrow(RangeError);
  });
});

describe('rankHistogram', () => {
  it('bins ranks 0..L in equal bins', () => {
    // L = 9: ranks 0..9 in 5 bins of two
    expect(rankHistogram([0, 1, 2, 9, 9, 5, NaN], 9, 5)).toEqual([2, 1, 1, 0, 2]);
    expect(() => rankHistogram([0], 9, 4)).toThrow(RangeError);
    expect(() => rankHistogram([10], 9, 5)).toThrow(RangeError);
  });
});

describe('uniformityTest (Pearson chi-square)', () => {
  it('is 0 with p = 1 for equal counts', () => {
    const t = uniformityTest([10, 10, 10, 10]);
    expect(t.chiSquare).toBe(0);
    expect(t.df).toBe(3);
    expect(t.pValue).toBe(1);
  });

  it('computes the statistic by hand and the p-value from the chi-square distribution', () => {
    // counts 14, 6, 10, 10 (n 40, E 10): (16 + 16 + 0 + 0) / 10 = 3.2 on 3 degrees of freedom
    const t = uniformityTest([14, 6, 10, 10]);
    expect(t.chiSquare).toBeCloseTo(3.2, 12);
    // the statistic at the 0.95 quantile of chi-square(3) from @stdlib gives p = 0.05
    const q95 = chisqQuantile(0.95, 3);
    expect(q95).toBeCloseTo(7.8147, 3); // from memory: the textbook table value 7.815
    const counts = [10 + Math.sqrt(q95 * 10 / 2), 10 - Math.sqrt(q95 * 10 / 2), 10, 10];
    expect(uniformityTest(counts).pValue).toBeCloseTo(0.05, 9);
  });

  it('gives NaN without counts', () => {
    expect(uniformityTest([0, 0]).pValue).toBeNaN();
  });
});
