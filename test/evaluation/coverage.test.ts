import { describe, it, expect } from 'vitest';
import { centralInterval, coverage, inside } from '../../src/evaluation/coverage.js';

describe('coverage of central intervals on a constructed case', () => {
  // samples 0, 1, ..., 100: the type-7 quantile at p is exactly 100 p (Hyndman and Fan 1996,
  // definition 7), so the 50% interval is [25, 75] and the 90% interval [5, 95]
  const sorted = Float64Array.from({ length: 101 }, (_, i) => i);

  it('takes the intervals from the sample quantiles', () => {
    const close = (got: [number, number], want: [number, number]) => got.forEach((v, i) => expect(v).toBeCloseTo(want[i]!, 10));
    close(centralInterval(sorted, 0.5), [25, 75]);
    close(centralInterval(sorted, 0.9), [5, 95]);
  });

  it('counts the outcomes inside, both ends included (counted by hand)', () => {
    const outcomes = [0, 5, 24, 25, 50, 75, 76, 95, 96, 100];
    const [lo50, hi50] = centralInterval(sorted, 0.5);
    const [lo90, hi90] = centralInterval(sorted, 0.9);
    // inside [25, 75]: 25, 50, 75 -> 3 of 10; inside [5, 95]: 5, 24, 25, 50, 75, 76, 95 -> 7 of 10
    expect(coverage(outcomes.map((y) => inside(y, lo50, hi50)))).toBe(0.3);
    expect(coverage(outcomes.map((y) => inside(y, lo90, hi90)))).toBe(0.7);
  });

  it('leaves out NaN outcomes and gives NaN with none', () => {
    expect(inside(NaN, 0, 1)).toBeNaN();
    expect(coverage([1, NaN, 0, 1])).toBeCloseTo(2 / 3, 15);
    expect(coverage([NaN])).toBeNaN();
  });
});
