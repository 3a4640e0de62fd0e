// summarizeSample against the definition its quantiles implement: type 7 of Hyndman and Fan
// (1996), "Sample quantiles in statistical packages", The American Statistician 50(4), h =
// (n - 1) p and linear interpolation between the order statistics around h.
import { describe, expect, it } from 'vitest';
import { summarizeSample } from '../../src/outputs/stats.js';

describe('summarizeSample', () => {
  it('textbook values: the median and quartiles of 1..10 are 5.5, 3.25 and 7.75 (type 7, common practice)', () => {
    const v = Float64Array.from([7, 3, 10, 1, 5, 9, 2, 8, 4, 6]);
    expect(summarizeSample(v, [0.25, 0.5, 0.75]).quantiles).toEqual([3.25, 5.5, 7.75]);
    // the levels in any order; the extremes are the minimum and maximum
    expect(summarizeSample(v, [1, 0, 0.5]).quantiles).toEqual([10, 1, 5.5]);
    const s = summarizeSample(v, [0.5]);
    expect(s.mean).toBe(5.5);
    // sd of 1..10 with n - 1: the squared deviations sum to 82.5, over 9
    expect(s.sd).toBeCloseTo(Math.sqrt(82.5 / 9), 14);
    // the input is left as it is
    expect(Array.from(v)).toEqual([7, 3, 10, 1, 5, 9, 2, 8, 4, 6]);
  });

  it('heavy ties: 0.05 of 20 values with 19 zeros and one 5 is 0, the 0.975 level 2.625', () => {
    const v = new Float64Array(20);
    v[7] = 5;
    // h = 19 * 0.975 = 18.525: 0 + 0.525 * (5 - 0)
    expect(summarizeSample(v, [0.05, 0.975]).quantiles[0]).toBe(0);
    expect(summarizeSample(v, [0.05, 0.975]).quantiles[1]).toBeCloseTo(2.625, 12);
  });
});
